import * as d3 from "d3";

/**
 * Honest colour scales for maps (heat maps, the LDOS map): which values the two ends of the
 * colour bar stand for, whether the scale is absolute (from 0, or a stated physical range) or
 * relative (stretched over the data), and the colours themselves: viridis (an open,
 * colour-blind-safe sequential map whose lightness rises monotonically) cut so that no colour
 * comes near the page background, and a blue-grey-orange diverging map for signed quantities.
 */

/** Relative luminance of an sRGB colour (WCAG 2). */
export function luminance(colour: string): number {
  const { r, g, b } = d3.rgb(colour);
  const lin = (v: number) => {
    const c = v / 255;
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
}

/** Contrast ratio of two colours (WCAG 2): 1 for equal colours, 21 for black on white. */
export function contrastRatio(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((p, q) => q - p);
  return (hi + 0.05) / (lo + 0.05);
}

/** Least contrast of every data colour against the backgrounds a map sits on (surface and canvas). */
export const MIN_DATA_CONTRAST = 2;

const SAMPLES = 200;

/**
 * The longest stretch [t0, t1] of viridis whose colours all keep MIN_DATA_CONTRAST against every
 * background given (a theme's surface and canvas); in a light theme that drops the pale yellow
 * end, in a dark theme the deep purple end. Returns the map of [0, 1] onto that stretch.
 */
export function sequentialInterpolator(backgrounds: readonly string[]): ((t: number) => string) & { from: number; to: number } {
  const ok = (t: number) => backgrounds.every((b) => contrastRatio(d3.interpolateViridis(t), b) >= MIN_DATA_CONTRAST);
  let best: [number, number] = [0, 1];
  let bestLen = -1;
  let start = -1;
  for (let i = 0; i <= SAMPLES + 1; i++) {
    const good = i <= SAMPLES && ok(i / SAMPLES);
    if (good && start < 0) start = i;
    if (!good && start >= 0) {
      if (i - 1 - start > bestLen) {
        bestLen = i - 1 - start;
        best = [start / SAMPLES, (i - 1) / SAMPLES];
      }
      start = -1;
    }
  }
  const [from, to] = best;
  return Object.assign((t: number) => d3.interpolateViridis(from + Math.max(0, Math.min(1, t)) * (to - from)), { from, to });
}

/**
 * Diverging map for signed quantities: blue (negative) through a mid grey (zero) to orange
 * (positive), a hue pair colour-blind readers tell apart; every colour keeps MIN_DATA_CONTRAST
 * against the light and the dark backgrounds (tests/unit/components/charts).
 */
export const DIVERGING_STOPS = ["#2f6db5", "#6f9fd0", "#a3a3a3", "#d99a4e", "#b8650c"];
export const divergingInterpolator = d3.interpolateRgbBasis(DIVERGING_STOPS);

/** Below this relative spread a map counts as uniform and is not stretched by default. */
export const UNIFORM_SPREAD = 0.01;

export interface ColourScale {
  kind: "sequential" | "diverging";
  /** absolute: from 0 (or the stated physical range); relative: the ends are the data's min and max. */
  mode: "absolute" | "relative";
  /** Values at the two ends of the colour bar, in the quantity's unit. */
  domain: [number, number];
  min: number;
  max: number;
  /** (max - min) / max |value|, a fraction (0 when every value is equal). */
  spread: number;
  /** The spread is below UNIFORM_SPREAD. */
  uniform: boolean;
  /** Relative although the map is uniform: the user asked to stretch it. */
  stretched: boolean;
  /** Whether the absolute / relative toggle has a choice to offer. */
  canToggle: boolean;
  /** Position of a value along the colour bar, 0 at the low end and 1 at the high end (clamped). */
  position: (v: number) => number;
}

/**
 * Chooses the colour scale of a map. `relative`: null for the default (relative when the spread
 * is at least UNIFORM_SPREAD, absolute from 0 when the map is uniform), true or false when the
 * user chose. `range`: the quantity's physical range for the absolute scale (default: from 0 to
 * the largest value, or from the smallest to 0 for negative data). Signed data (values of both
 * signs) take the diverging map, symmetric about 0. Null when there is no finite value.
 */
export function chooseColourScale(values: ArrayLike<number | null>, opts: { relative?: boolean | null; range?: [number, number] } = {}): ColourScale | null {
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v === null || !Number.isFinite(v)) continue;
    min = Math.min(min, v);
    max = Math.max(max, v);
  }
  if (min > max) return null;
  const maxAbs = Math.max(Math.abs(min), Math.abs(max));
  const spread = maxAbs > 0 ? (max - min) / maxAbs : 0;
  const uniform = spread < UNIFORM_SPREAD;
  const make = (kind: ColourScale["kind"], mode: ColourScale["mode"], domain: [number, number], canToggle: boolean): ColourScale => {
    const [lo, hi] = domain;
    return {
      kind,
      mode,
      domain,
      min,
      max,
      spread,
      uniform,
      stretched: mode === "relative" && uniform,
      canToggle,
      position: (v) => (hi > lo ? Math.max(0, Math.min(1, (v - lo) / (hi - lo))) : 0.5),
    };
  };
  if (min < 0 && max > 0) return make("diverging", "absolute", [-maxAbs, maxAbs], false);
  const absolute: [number, number] = opts.range ?? (maxAbs === 0 ? [0, 1] : min >= 0 ? [0, max] : [min, 0]);
  const canToggle = max > min;
  const relative = canToggle && (opts.relative ?? !uniform);
  return relative ? make("sequential", "relative", [min, max], canToggle) : make("sequential", "absolute", absolute, canToggle);
}

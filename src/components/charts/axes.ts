import * as d3 from "d3";
import type { Palette } from "./palette";

/**
 * The one axis helper of the charts: tick labels with SI prefixes or powers of ten (never d3's
 * thousands grouping), and margins measured from the longest tick label and the axis titles so
 * that nothing overlaps or leaves the SVG.
 */

/** Units that take an SI prefix on a tick (1 GΩ, 20 µS, 500 mK); others get a power of ten. */
export const PREFIXABLE_UNITS = new Set(["Ω", "S", "T", "K", "V", "A", "s", "Hz", "W", "eV", "m"]);

const PREFIXES: [number, string][] = [
  [15, "P"],
  [12, "T"],
  [9, "G"],
  [6, "M"],
  [3, "k"],
  [0, ""],
  [-3, "m"],
  [-6, "µ"],
  [-9, "n"],
  [-12, "p"],
  [-15, "f"],
];

const SUPERSCRIPT: Record<string, string> = { "-": "⁻", "0": "⁰", "1": "¹", "2": "²", "3": "³", "4": "⁴", "5": "⁵", "6": "⁶", "7": "⁷", "8": "⁸", "9": "⁹" };

/** 10 to the power n as text: 10¹⁰, 10⁻⁵. */
export const powerOfTen = (n: number) => `10${[...String(n)].map((c) => SUPERSCRIPT[c]).join("")}`;

/** Plain decimals are used for magnitudes in [1e-3, 1e4); outside, a prefix or a power of ten. */
const PLAIN_FROM = 1e-3;
const PLAIN_BELOW = 1e4;

/** The unit in a title's last parentheses: "Resistance (Ω)" -> "Ω". */
export function unitOfTitle(title: string): string {
  const m = /\(([^()]*)\)\s*$/.exec(title);
  return m ? m[1].trim() : "";
}

const fixed = (x: number, decimals: number) => {
  const s = x.toFixed(Math.max(0, Math.min(15, decimals)));
  // Proper minus sign, and no "-0".
  return /^-0(\.0*)?$/.test(s) ? s.slice(1) : s.replace("-", "−");
};

/** Decimals needed to write values spaced by `step` (at least one significant digit of the step). */
const decimalsFor = (step: number) => (step > 0 && Number.isFinite(step) ? Math.max(0, -Math.floor(Math.log10(step) + 1e-9)) : 0);

/**
 * Labels for a set of tick values (or the two ends of a colour bar), all with the same notation
 * and enough digits that no two different values share a label. With `unit` in PREFIXABLE_UNITS,
 * large and small values take an SI prefix and the unit ("200 MΩ"); otherwise a common power of
 * ten ("2·10¹⁰"). Values between 1e-3 and 1e4 are plain decimals. Zero is "0". With
 * `significant`, the largest value keeps at least that many significant digits (colour-bar ends).
 */
export function formatTicks(values: readonly number[], unit = "", significant = 1): string[] {
  const finite = values.filter(Number.isFinite);
  const maxAbs = finite.reduce((m, v) => Math.max(m, Math.abs(v)), 0);
  if (maxAbs === 0) return values.map((v) => (Number.isFinite(v) ? "0" : "–"));
  const sorted = [...new Set(finite)].sort((a, b) => a - b);
  let step = Infinity;
  for (let i = 1; i < sorted.length; i++) step = Math.min(step, sorted[i] - sorted[i - 1]);
  if (!Number.isFinite(step)) step = maxAbs;
  let scale = 1;
  let suffix: (v: number) => string = () => "";
  if (maxAbs < PLAIN_FROM || maxAbs >= PLAIN_BELOW) {
    const e = Math.floor(Math.log10(maxAbs) + 1e-12);
    if (PREFIXABLE_UNITS.has(unit)) {
      const e3 = Math.max(-15, Math.min(15, Math.floor(e / 3) * 3));
      const prefix = PREFIXES.find(([p]) => p === e3)![1];
      scale = 10 ** e3;
      suffix = (v) => (v === 0 ? "" : ` ${prefix}${unit}`);
    } else {
      scale = 10 ** e;
      suffix = (v) => (v === 0 ? "" : `·${powerOfTen(e)}`);
    }
  }
  for (let extra = 0; extra <= 12; extra++) {
    let d = Math.max(decimalsFor(step / scale), significant - 1 - Math.floor(Math.log10(maxAbs / scale) + 1e-12)) + extra;
    // A step like 2.5 needs one decimal more than its leading digit says (at most two more).
    for (let more = 0; more < 2 && finite.some((v) => Math.abs(Number((v / scale).toFixed(d)) - v / scale) > 0.01 * (step / scale)); more++) d++;
    const labels = values.map((v) => (!Number.isFinite(v) ? "–" : v === 0 ? "0" : fixed(v / scale, d) + suffix(v)));
    const distinct = new Set(labels.filter((_, i) => Number.isFinite(values[i])));
    if (distinct.size === new Set(finite).size) return labels;
  }
  return values.map((v) => (Number.isFinite(v) ? String(v) : "–"));
}

/** Font sizes of tick labels and axis titles (px). */
export const TICK_FONT = 11;
export const TITLE_FONT = 12;
const TICK_SIZE = 6;
const TICK_PAD = 3;
const GAP = 8;

/** Widths of these texts as the SVG would draw them at this font size (a hidden text element). */
export function measureTexts(svg: d3.Selection<SVGSVGElement, unknown, null, undefined>, texts: readonly string[], fontSize: number, mono = true): number[] {
  const t = svg
    .append("text")
    .attr("font-size", fontSize)
    .attr("font-family", mono ? "var(--font-mono), monospace" : null)
    .attr("visibility", "hidden");
  const widths = texts.map((s) => {
    t.text(s);
    const node = t.node();
    return node && typeof node.getComputedTextLength === "function" ? node.getComputedTextLength() : s.length * fontSize * 0.62;
  });
  t.remove();
  return widths;
}

export interface AxisInput {
  scale: d3.ScaleLinear<number, number>;
  title: string;
  /** Unit of the tick values (SI prefixes when it takes them); default: the title's "(unit)". */
  unit?: string;
  /** Tick values to use instead of d3's ticks for the axis length. */
  tickValues?: number[];
}

export interface Frame {
  /** The plot group, shifted by the margins: innerW x innerH. */
  g: d3.Selection<SVGGElement, unknown, null, undefined>;
  innerW: number;
  innerH: number;
  margin: { top: number; right: number; bottom: number; left: number };
  x: d3.ScaleLinear<number, number>;
  y: d3.ScaleLinear<number, number>;
}

/**
 * Lays out a chart in an SVG of width x height: measures the y tick labels and the x labels,
 * sets the scales' ranges, draws both axes (ticks with formatTicks), the y grid and the titles,
 * and returns the plot group. `top` and `right` reserve extra room (labels above the plot, a
 * colour bar on the right).
 */
export function drawFrame(
  svg: d3.Selection<SVGSVGElement, unknown, null, undefined>,
  width: number,
  height: number,
  p: Palette,
  xIn: AxisInput,
  yIn: AxisInput,
  opts: { top?: number; right?: number; grid?: boolean } = {},
): Frame {
  const top = opts.top ?? 14;
  const lineH = TICK_FONT + 2;
  const bottom = TICK_SIZE + TICK_PAD + lineH + GAP + TITLE_FONT + 6;
  const innerH = Math.max(40, height - top - bottom);
  const y = yIn.scale.copy().range([innerH, 0]);
  const yTicks = yIn.tickValues ?? y.ticks(Math.max(3, Math.floor(innerH / 50)));
  const yLabels = formatTicks(yTicks, yIn.unit ?? unitOfTitle(yIn.title));
  const yWidth = Math.max(0, ...measureTexts(svg, yLabels, TICK_FONT));
  const left = TICK_SIZE + TICK_PAD + yWidth + GAP + TITLE_FONT + 6;
  let right = opts.right ?? 18;
  const xUnit = xIn.unit ?? unitOfTitle(xIn.title);
  const x = xIn.scale.copy().range([0, Math.max(40, width - left - right)]);
  // As many x ticks as fit side by side with a gap, from one per 80 px down to 2.
  let count = Math.max(2, Math.floor((width - left - right) / 80));
  let xTicks: number[] = [];
  let xLabels: string[] = [];
  let xWidths: number[] = [];
  for (;;) {
    xTicks = xIn.tickValues ?? x.ticks(count);
    xLabels = formatTicks(xTicks, xUnit);
    xWidths = measureTexts(svg, xLabels, TICK_FONT);
    const fits = xTicks.every((t, i) => i === 0 || x(t) - x(xTicks[i - 1]) >= (xWidths[i] + xWidths[i - 1]) / 2 + GAP);
    if (fits || xIn.tickValues || count <= 2) break;
    count = Math.max(2, Math.floor(count * 0.7));
  }
  // The last label may stick out past the plot: widen the right margin to hold it.
  const last = xTicks.length - 1;
  if (last >= 0) {
    const overhang = x(xTicks[last]) + xWidths[last] / 2 - x.range()[1];
    if (overhang > right - 2) {
      right = overhang + 4;
      x.range([0, Math.max(40, width - left - right)]);
    }
  }
  const innerW = x.range()[1];
  const margin = { top, right, bottom, left };
  const g = svg.append("g").attr("transform", `translate(${left},${top})`);
  if (opts.grid !== false) {
    g.append("g")
      .attr("data-layer", "grid")
      .selectAll("line")
      .data(yTicks)
      .join("line")
      .attr("x1", 0)
      .attr("x2", innerW)
      .attr("y1", (d) => y(d))
      .attr("y2", (d) => y(d))
      .attr("stroke", p.grid);
  }
  const ax = g
    .append("g")
    .attr("transform", `translate(0,${innerH})`)
    .attr("data-axis", "x")
    .call(
      d3
        .axisBottom(x)
        .tickValues(xTicks)
        .tickSize(TICK_SIZE)
        .tickPadding(TICK_PAD)
        .tickFormat((_, i) => xLabels[i] ?? ""),
    );
  const ay = g
    .append("g")
    .attr("data-axis", "y")
    .call(
      d3
        .axisLeft(y)
        .tickValues(yTicks)
        .tickSize(TICK_SIZE)
        .tickPadding(TICK_PAD)
        .tickFormat((_, i) => yLabels[i] ?? ""),
    );
  for (const a of [ax, ay]) {
    a.selectAll("path, line").attr("stroke", p.faint);
    a.selectAll("text").attr("fill", p.fg).attr("font-size", TICK_FONT).attr("font-family", "var(--font-mono), monospace");
  }
  g.append("text")
    .attr("x", innerW / 2)
    .attr("y", innerH + TICK_SIZE + TICK_PAD + lineH + GAP + TITLE_FONT - 2)
    .attr("text-anchor", "middle")
    .attr("fill", p.fg)
    .attr("font-size", TITLE_FONT)
    .attr("data-label", "x")
    .text(xIn.title);
  g.append("text")
    .attr("transform", `translate(${-left + TITLE_FONT + 2},${innerH / 2}) rotate(-90)`)
    .attr("text-anchor", "middle")
    .attr("fill", p.fg)
    .attr("font-size", TITLE_FONT)
    .attr("data-label", "y")
    .text(yIn.title);
  return { g, innerW, innerH, margin, x, y };
}

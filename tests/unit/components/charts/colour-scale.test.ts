// Colour scales of the maps (src/components/charts/colorScale.ts, ColourBar.tsx): no data colour
// may come near the page background in either theme (contrast ratio of WCAG 2, checked against the
// surface and canvas colours of src/app/globals.css), lightness rises along the sequential map,
// a uniform map is not stretched by default, and the colour bar's ends never share a label.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import {
  chooseColourScale,
  contrastRatio,
  divergingInterpolator,
  luminance,
  MIN_DATA_CONTRAST,
  sequentialInterpolator,
  UNIFORM_SPREAD,
} from "@/components/charts/colorScale";
import { colourBarTicks } from "@/components/charts/ColourBar";

const css = readFileSync(join(import.meta.dirname, "..", "..", "..", "..", "src", "app", "globals.css"), "utf8");
/** The value of a theme variable in the first block of globals.css that sets it after `from`. */
const variable = (name: string, from: number) => {
  const m = new RegExp(`--tk-${name}:\\s*(#[0-9a-fA-F]{6})`).exec(css.slice(from));
  if (!m) throw new Error(`--tk-${name} not found in globals.css`);
  return m[1];
};
const darkAt = css.indexOf("@variant theme-dark");
const themes = {
  light: [variable("surface", 0), variable("canvas", 0)],
  dark: [variable("surface", darkAt), variable("canvas", darkAt)],
};
const samples = Array.from({ length: 101 }, (_, i) => i / 100);

describe("colours of the maps against the page background", () => {
  it("reads both themes' backgrounds from globals.css (a dark and a light pair)", () => {
    expect(darkAt).toBeGreaterThan(0);
    for (const c of themes.light) expect(luminance(c)).toBeGreaterThan(0.8);
    for (const c of themes.dark) expect(luminance(c)).toBeLessThan(0.05);
  });

  for (const [theme, backgrounds] of Object.entries(themes)) {
    it(`keeps every colour of the sequential map, ends included, at contrast ${MIN_DATA_CONTRAST} or more in the ${theme} theme`, () => {
      const interp = sequentialInterpolator(backgrounds);
      for (const bg of backgrounds) {
        expect(contrastRatio(interp(0), bg)).toBeGreaterThanOrEqual(MIN_DATA_CONTRAST);
        expect(contrastRatio(interp(1), bg)).toBeGreaterThanOrEqual(MIN_DATA_CONTRAST);
        for (const t of samples) expect(contrastRatio(interp(t), bg)).toBeGreaterThanOrEqual(MIN_DATA_CONTRAST);
      }
      // Most of viridis stays: the cut only drops the end that would vanish.
      expect(interp.to - interp.from).toBeGreaterThan(0.6);
      // Lightness rises monotonically, so the map reads in grey and for colour-blind readers.
      for (let i = 1; i < samples.length; i++) expect(luminance(interp(samples[i]))).toBeGreaterThanOrEqual(luminance(interp(samples[i - 1])) - 1e-9);
    });
  }

  it("keeps the uncut viridis ends away from the background they were lost in (the check has teeth)", () => {
    const full = sequentialInterpolator([]);
    expect(full.from).toBe(0);
    expect(full.to).toBe(1);
    expect(contrastRatio(full(0), themes.dark[0])).toBeLessThan(1.3); // the deep purple end on the dark surface
    expect(contrastRatio(full(1), themes.light[0])).toBeLessThan(1.3); // the yellow end on white
  });

  it("keeps every colour of the diverging map at the same contrast against all four backgrounds", () => {
    for (const bg of [...themes.light, ...themes.dark])
      for (const t of samples) expect(contrastRatio(divergingInterpolator(t), bg)).toBeGreaterThanOrEqual(MIN_DATA_CONTRAST);
  });
});

describe("choosing the colour scale", () => {
  // A clean network's LDOS: a spread of 0.04 % around 0.1081 states/meV.
  const uniform = [0.10812, 0.10816, 0.10814, 0.10815];

  it("draws a map uniform to within 1 % on an absolute scale from 0 by default", () => {
    const s = chooseColourScale(uniform)!;
    expect(s.uniform).toBe(true);
    expect(s.mode).toBe("absolute");
    expect(s.domain).toEqual([0, 0.10816]);
    expect(s.spread).toBeCloseTo(0.00004 / 0.10816, 12);
    expect(s.spread).toBeLessThan(UNIFORM_SPREAD);
    expect(s.stretched).toBe(false);
    // Every link then sits at nearly the same colour, near the top of the bar.
    for (const v of uniform) expect(s.position(v)).toBeGreaterThan(0.999);
  });

  it("stretches a uniform map only when asked, and says so", () => {
    const s = chooseColourScale(uniform, { relative: true })!;
    expect(s.mode).toBe("relative");
    expect(s.stretched).toBe(true);
    expect(s.domain).toEqual([0.10812, 0.10816]);
    expect(s.position(0.10812)).toBe(0);
    expect(s.position(0.10816)).toBe(1);
  });

  it("draws a map with a large spread relative to its min and max by default", () => {
    const s = chooseColourScale([0.2, 0.5, 1.0])!;
    expect(s.uniform).toBe(false);
    expect(s.mode).toBe("relative");
    expect(s.stretched).toBe(false);
    expect(s.spread).toBeCloseTo(0.8, 12);
    expect(chooseColourScale([0.2, 0.5, 1.0], { relative: false })!.domain).toEqual([0, 1]);
  });

  it("takes the diverging map, symmetric about 0, for signed values", () => {
    const s = chooseColourScale([-2, 0.5, 1])!;
    expect(s.kind).toBe("diverging");
    expect(s.domain).toEqual([-2, 2]);
    expect(s.position(0)).toBe(0.5);
    expect(s.canToggle).toBe(false);
  });

  it("has nothing to stretch when every value is equal, and nothing to draw without finite values", () => {
    const s = chooseColourScale([3, 3, 3], { relative: true })!;
    expect(s.mode).toBe("absolute");
    expect(s.spread).toBe(0);
    expect(s.canToggle).toBe(false);
    expect(chooseColourScale([null, NaN])).toBeNull();
  });

  it("labels the two ends of the colour bar differently, even for a 0.04 % spread stretched over the bar", () => {
    for (const s of [chooseColourScale(uniform)!, chooseColourScale(uniform, { relative: true })!, chooseColourScale([1e9, 2e9, 5e9])!]) {
      const ticks = colourBarTicks(s, "states/meV");
      const low = ticks.find((t) => t.end === "low")!;
      const high = ticks.find((t) => t.end === "high")!;
      expect(low.label).not.toBe(high.label);
      expect(new Set(ticks.map((t) => t.label)).size).toBe(ticks.length);
    }
    const stretched = colourBarTicks(chooseColourScale(uniform, { relative: true })!, "states/meV");
    expect(stretched[0].label).toBe("0.10812");
    expect(stretched[stretched.length - 1].label).toBe("0.10816");
    const fromZero = colourBarTicks(chooseColourScale(uniform)!, "states/meV");
    expect(fromZero.map((t) => t.label)).toEqual(["0", "0.02", "0.04", "0.06", "0.08", "0.1082"]);
  });
});

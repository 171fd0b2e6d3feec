// Tick labels of every chart (src/components/charts/axes.ts): SI prefixes for units that take
// them, a power of ten otherwise, plain decimals in between, never d3's thousands grouping.
import { describe, expect, it } from "vitest";
import { formatTicks, powerOfTen, unitOfTitle } from "@/components/charts/axes";

describe("formatTicks", () => {
  it("writes a carrier density of 2e10 cm⁻² as a power of ten, never with thousands separators", () => {
    const labels = formatTicks([0, 1e10, 2e10, 3e10], "cm⁻²");
    expect(labels).toEqual(["0", "1·10¹⁰", "2·10¹⁰", "3·10¹⁰"]);
    for (const l of labels) expect(l).not.toMatch(/,/);
  });

  it("puts an SI prefix and the unit on resistances up to 1e9 Ω", () => {
    expect(formatTicks([0, 2e8, 4e8, 6e8, 8e8, 1e9], "Ω")).toEqual(["0", "0.2 GΩ", "0.4 GΩ", "0.6 GΩ", "0.8 GΩ", "1.0 GΩ"]);
    expect(formatTicks([0, 2e5, 4e5], "Ω")).toEqual(["0", "200 kΩ", "400 kΩ"]);
    expect(formatTicks([25_000, 30_000], "Ω")).toEqual(["25 kΩ", "30 kΩ"]);
  });

  it("writes small values with a prefix (siemens) or a negative power of ten", () => {
    expect(formatTicks([1e-5, 2e-5, 3e-5], "S")).toEqual(["10 µS", "20 µS", "30 µS"]);
    expect(formatTicks([2.5e-5, 5e-5], "")).toEqual(["2.5·10⁻⁵", "5.0·10⁻⁵"]);
    expect(formatTicks([0, 2.5, 5, 7.5])).toEqual(["0", "2.5", "5.0", "7.5"]);
    expect(formatTicks([5e-13, 1e-12], "e²/h")).toEqual(["0.5·10⁻¹²", "1.0·10⁻¹²"]);
  });

  it("keeps plain decimals between 1e-3 and 1e4 with the decimals the step needs", () => {
    expect(formatTicks([0, 0.5, 1, 1.5], "e²/h")).toEqual(["0", "0.5", "1.0", "1.5"]);
    expect(formatTicks([0, 2000, 4000, 6000, 8000], "meV")).toEqual(["0", "2000", "4000", "6000", "8000"]);
    expect(formatTicks([0.002, 0.004], "")).toEqual(["0.002", "0.004"]);
  });

  it("uses a proper minus sign for negative values and never writes -0", () => {
    expect(formatTicks([-1, -0.5, 0, 0.5, 1])).toEqual(["−1.0", "−0.5", "0", "0.5", "1.0"]);
    expect(formatTicks([-3e10, 0, 3e10], "cm⁻²")).toEqual(["−3·10¹⁰", "0", "3·10¹⁰"]);
    expect(formatTicks([-2e6, -1e6], "Ω")).toEqual(["−2 MΩ", "−1 MΩ"]);
  });

  it("gives two close values (the ends of a colour bar) enough digits to tell them apart", () => {
    const [lo, hi] = formatTicks([0.10812, 0.10816]);
    expect(lo).not.toBe(hi);
    expect([lo, hi]).toEqual(["0.10812", "0.10816"]);
    const [a, b] = formatTicks([1.08123e10, 1.08127e10]);
    expect(a).not.toBe(b);
    expect(a).toBe("1.08123·10¹⁰");
  });

  it("keeps a stated number of significant digits of the largest value when asked", () => {
    expect(formatTicks([0, 0.1082], "", 4)).toEqual(["0", "0.1082"]);
    expect(formatTicks([0, 0.1082], "")).toEqual(["0", "0.108"]);
  });

  it("writes 0 as 0 and all zeros as zeros", () => {
    expect(formatTicks([0, 0, 0])).toEqual(["0", "0", "0"]);
    expect(formatTicks([0], "Ω")).toEqual(["0"]);
  });

  it("reads the unit from a title's last parentheses", () => {
    expect(unitOfTitle("Resistance R_xx (Ω)")).toBe("Ω");
    expect(unitOfTitle("DOS (states / meV / moiré cell)")).toBe("states / meV / moiré cell");
    expect(unitOfTitle("Count")).toBe("");
    expect(powerOfTen(-15)).toBe("10⁻¹⁵");
  });
});

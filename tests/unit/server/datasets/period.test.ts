import { describe, expect, it } from "vitest";
import { periodFromTwistNm } from "@/engine/constants";
import { analysePeriod, areaNm2FromFieldPeriod, readingsFromArea, twistDegreesFromPeriodNm } from "@/shared/period";
import { seededRandom } from "../../../support/random";

describe("period to twist angle conversion", () => {
  it("agrees with l = a / (2 sin(theta/2)), a = 0.246 nm (physics.md section 4)", () => {
    // theta = 0.1 degree gives l of about 141 nm (physics.md, derived): 0.246 / (2 sin(0.05 deg)).
    expect(periodFromTwistNm(0.1)).toBeCloseTo(0.246 / (2 * Math.sin((0.05 * Math.PI) / 180)), 9);
    expect(periodFromTwistNm(0.1)).toBeCloseTo(140.95, 1);
    for (const theta of [0.05, 0.11, 0.3, 1.1, 5]) expect(twistDegreesFromPeriodNm(periodFromTwistNm(theta))!).toBeCloseTo(theta, 10);
    expect(twistDegreesFromPeriodNm(0.1)).toBeNull(); // shorter than a/2: no angle
    expect(twistDegreesFromPeriodNm(0.123)).toBeCloseTo(180, 9); // exactly a/2: theta = 180 degrees
    for (const l of [0, -5, Number.NaN, Number.POSITIVE_INFINITY]) expect(twistDegreesFromPeriodNm(l)).toBeNull();
  });
  it("turns a field period into an area with h/e exact and into l for one flux quantum per triangle or per cell", () => {
    const l = periodFromTwistNm(0.11);
    const aTri = (Math.sqrt(3) / 4) * l * l;
    // dB = (h/e) / A, h/e = 6.62607015e-34 / 1.602176634e-19 Wb (exact SI 2019)
    const dB = 6.62607015e-34 / 1.602176634e-19 / (aTri * 1e-18);
    expect(areaNm2FromFieldPeriod(dB)).toBeCloseTo(aTri, 6);
    const r = readingsFromArea(aTri);
    expect(r.perTriangle.periodNm).toBeCloseTo(l, 8);
    expect(r.perTriangle.twistDegrees!).toBeCloseTo(0.11, 10);
    expect(r.perUnitCell.periodNm).toBeCloseTo(l / Math.SQRT2, 8);
    expect(r.perTriangle.assumption).toMatch(/triangle/);
  });
});

describe("analysePeriod", () => {
  it("recovers the period of a synthetic oscillation on a background to 1 % (uniform grid, several seeds)", () => {
    for (const seed of [1, 2, 3, 4]) {
      const r = seededRandom(seed);
      const dB = 0.05 + 0.1 * r.uniform(); // tesla
      const phase = 2 * Math.PI * r.uniform();
      const n = 160;
      const x = Array.from({ length: n }, (_, i) => -0.6 + (1.2 * i) / (n - 1));
      const y = x.map((b) => 3 + 0.8 * b * b - 0.3 * b + 0.05 * Math.cos((2 * Math.PI * b) / dB + phase) + 0.005 * r.gaussian());
      const a = analysePeriod(x, y);
      expect(Math.abs(a.periodTesla - dB) / dB).toBeLessThan(0.01);
      expect(a.settings.resampled).toBe(false);
      expect(a.peak.prominence).toBeGreaterThan(5);
    }
  });
  it("resamples a non-uniform field grid and still recovers the period to 1 %", () => {
    const r = seededRandom(11);
    const x: number[] = [];
    let b = 0;
    for (let i = 0; i < 220; i++) {
      x.push(b);
      b += 0.004 + 0.004 * r.uniform();
    }
    const dB = 0.072;
    const y = x.map((v) => 1.5 + 0.2 * v + 0.03 * Math.sin((2 * Math.PI * v) / dB) + 0.002 * r.gaussian());
    const a = analysePeriod(x, y);
    expect(a.settings.resampled).toBe(true);
    expect(Math.abs(a.periodTesla - dB) / dB).toBeLessThan(0.01);
    expect(a.perTriangle.periodNm).toBeCloseTo(Math.sqrt((4 * a.areaNm2) / Math.sqrt(3)), 9);
  });
  it("rejects too short curves and bad settings by name", () => {
    expect(() => analysePeriod([0, 1, 2], [1, 2, 3])).toThrow(/at least 16 points/);
    const x = Array.from({ length: 32 }, (_, i) => i * 0.01);
    expect(() => analysePeriod(x, x, { backgroundDegree: 12 })).toThrow(/backgroundDegree/);
  });
});

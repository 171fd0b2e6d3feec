// Units do not matter: one synthetic magnetoconductance curve (made by the engine, seeded noise)
// written as CSV in S, uS, e2/h, ohm and kohm, with and without an uncertainty column, is read by
// the upload's parser (src/shared/csv.ts, the only step where units enter: datasets are stored
// in e2/h and the fitter sees only stored points) and fitted on the engine; every fit gives the
// same node.forward within the noise. Small network, few points, one parameter, local stage only.
import { describe, expect, it } from "vitest";
import { CONDUCTANCE_QUANTUM_S, parseComputeInput } from "@/engine";
import { parseDatasetCsv, proposeMapping, previewCsv } from "@/shared/csv";
import type { YUnit } from "@/shared/units";
import { engine } from "@/server/fits/engine";
import { engineCurve, runFit } from "@/server/fits/model";
import type { FitResult } from "@/server/fits/fitter";
import { seededGaussian } from "../../../support/random";
import { triangularNetwork } from "@/shared/networks";

const input = parseComputeInput({
  network: triangularNetwork({ columns: 2, rows: 2 }, { forward: 0.5, left: 0.25, right: 0.25 }),
  computation: { kind: "conductance", energyMeV: 1.7, fieldTesla: 0, temperatureK: 0, contactOhms: 0 },
});

const TRUE_FORWARD = 0.62;
const SIGMA_E2H = 0.01;
const fieldT = Array.from({ length: 16 }, (_, i) => -1 + (2 * i) / 15);
const clean = engineCurve(engine, input, "fieldTesla", fieldT, { "node.forward": TRUE_FORWARD });
const noise = seededGaussian(21);
const measuredE2h = clean.map((g) => g + SIGMA_E2H * noise());

/** The same curve as a file in `unit` (x in mT, to exercise the x conversion too); sigma propagated to the unit. */
function csvIn(unit: YUnit, withSigma: boolean): string {
  const header = withSigma ? `B (mT),G_${unit},sigma_${unit}` : `B (mT),G_${unit}`;
  const lines = fieldT.map((b, i) => {
    const gSi = measuredE2h[i] * CONDUCTANCE_QUANTUM_S;
    const sSi = SIGMA_E2H * CONDUCTANCE_QUANTUM_S;
    const [y, s] =
      unit === "S"
        ? [gSi, sSi]
        : unit === "uS"
          ? [gSi * 1e6, sSi * 1e6]
          : unit === "e2/h"
            ? [measuredE2h[i], SIGMA_E2H]
            : unit === "ohm"
              ? [1 / gSi, sSi / gSi ** 2]
              : [1 / gSi / 1e3, sSi / gSi ** 2 / 1e3];
    const cells = [(b * 1e3).toPrecision(15), y.toPrecision(15), s.toPrecision(15)];
    return (withSigma ? cells : cells.slice(0, 2)).join(",");
  });
  return [header, ...lines].join("\n") + "\n";
}

const UNITS: YUnit[] = ["S", "uS", "e2/h", "ohm", "kohm"];

describe("fits do not depend on the unit of the upload", () => {
  it("reads the same stored curve from every unit, with and without sigma", () => {
    for (const unit of UNITS) {
      for (const withSigma of [true, false]) {
        const text = csvIn(unit, withSigma);
        const { mapping } = proposeMapping(previewCsv(text).columns);
        expect(mapping.yUnit).toBe(unit);
        const d = parseDatasetCsv(text, mapping);
        d.x.forEach((x, i) => expect(x).toBeCloseTo(fieldT[i], 12));
        d.y.forEach((y, i) => expect(Math.abs(y - measuredE2h[i])).toBeLessThan(1e-9 * Math.abs(measuredE2h[i])));
        if (withSigma) d.sigma!.forEach((s) => expect(Math.abs(s - SIGMA_E2H)).toBeLessThan(1e-9 * SIGMA_E2H));
        else expect(d.sigma).toBeNull();
      }
    }
  });

  it("fits node.forward to the same value in S, uS, e2/h, ohm and kohm, with and without sigma", () => {
    const results: { unit: YUnit; withSigma: boolean; r: FitResult }[] = [];
    for (const unit of UNITS) {
      for (const withSigma of [true, false]) {
        const text = csvIn(unit, withSigma);
        const d = parseDatasetCsv(text, proposeMapping(previewCsv(text).columns).mapping);
        const r = runFit(engine, {
          input,
          sweepParameter: "fieldTesla",
          x: d.x,
          y: d.y,
          sigma: d.sigma,
          fit: [{ parameter: "node.forward", initial: 0.55, min: 0.2, max: 0.9 }],
          options: { globalStarts: 0, multiStart: 1, maxIterations: 30 },
        });
        results.push({ unit, withSigma, r });
      }
    }
    const forward = (r: FitResult) => r.parameters[0];
    for (const { r, withSigma } of results) {
      const p = forward(r);
      expect(p.stderr).toBeGreaterThan(0);
      // the truth within the reported noise
      expect(Math.abs(p.value - TRUE_FORWARD)).toBeLessThan(3 * p.stderr!);
      expect(r.weighted).toBe(withSigma);
    }
    // Same weighting: the same numbers whatever the unit (far inside the noise).
    for (const withSigma of [true, false]) {
      const same = results.filter((x) => x.withSigma === withSigma);
      const ref = forward(same[0].r);
      for (const { r } of same) {
        expect(Math.abs(forward(r).value - ref.value)).toBeLessThan(0.01 * ref.stderr!);
        expect(Math.abs(forward(r).stderr! - ref.stderr!)).toBeLessThan(0.01 * ref.stderr!);
        expect(r.chi2PerDof).toBeCloseTo(same[0].r.chi2PerDof, 6);
      }
    }
    // With and without sigma (equal sigma on every point): the same optimum, within the noise.
    const w = forward(results.find((x) => x.withSigma)!.r);
    const u = forward(results.find((x) => !x.withSigma)!.r);
    expect(Math.abs(w.value - u.value)).toBeLessThan(Math.max(w.stderr!, u.stderr!));
  }, 120_000);
});

import { describe, expect, it } from "vitest";
import { parseComputeInput, type ConductanceComputation, type DosComputation } from "@/engine/schema";
import { computeConductance } from "@/engine/compute/conductance";
import { computeDos } from "@/engine/compute/dos";
import { periodicCell, torusOperator } from "@/engine/compute/spectrum-cell";
import { getKernels } from "@/engine/linalg/kernels";

const sq = (turning: number, extra: object = {}, computation: object = { kind: "conductance" }) =>
  parseComputeInput({ network: { lattice: "square", size: { columns: 8, rows: 5 }, periodNm: 80, node: { turning }, ...extra }, computation });

describe("check 9: square network, symmetric under p -> 1 - p (self-duality, Chalker & Coddington 1988)", () => {
  // Source: Chalker & Coddington, J. Phys. C 21, 2665 (1988): the network maps onto itself with the
  // sublattices exchanged; here the exact map is the mirror x -> -x combined with a half-cell shift,
  // which exchanges right and left turns.
  for (const p of [0.1, 0.3, 0.42]) {
    it(`two-terminal conductance of a clean cylinder with an even number of columns, p = ${p}`, () => {
      for (const E of [0.4, 2.9, 7.3]) {
        const a = sq(p, {}, { kind: "conductance", energyMeV: E }),
          b = sq(1 - p, {}, { kind: "conductance", energyMeV: E });
        const ga = computeConductance(a.network, a.computation as ConductanceComputation).conductance.total;
        const gb = computeConductance(b.network, b.computation as ConductanceComputation).conductance.total;
        expect(Math.abs(ga - gb)).toBeLessThan(1e-10);
      }
    });
  }
  // The mirror exchanges right and left turns and multiplies U by exp(-i pi/2) (up to a gauge): the
  // spectrum at 1 - p is the spectrum at p moved up by a quarter of the energy period (the node
  // phase convention fixes the energy origin; at p = 1/2 the spectrum is quarter-period symmetric).
  it("Bloch density of states: DOS(E; 1 - p, B) = DOS(E - period/4; p, -B), with and without flux", () => {
    for (const flux of [
      { numerator: 0, denominator: 1 },
      { numerator: 1, denominator: 3 },
    ]) {
      const base = sq(0.27, {}, { kind: "dos" });
      const period = computeDos(base.network, {
        kind: "dos",
        source: "bloch",
        kMesh: 1,
        flux,
        energies: { fromMeV: 0, toMeV: 1, points: 1 },
      } as DosComputation).energyPeriodMeV;
      const c = (from: number, f = flux) => ({ kind: "dos", kMesh: 12, flux: f, energies: { fromMeV: from, toMeV: from + 30, points: 7 }, broadeningMeV: 0.5 });
      // the mirror also reverses the field: flux -> -flux
      const a = sq(0.27, {}, c(-period / 4)),
        b = sq(0.73, {}, c(0, { numerator: -flux.numerator, denominator: flux.denominator }));
      const da = computeDos(a.network, a.computation as DosComputation).dosPerMeVPerCell.total;
      const db = computeDos(b.network, b.computation as DosComputation).dosPerMeVPerCell.total;
      da.forEach((x, i) => expect(Math.abs(x - db[i])).toBeLessThan(1e-10));
      const half = sq(0.5, {}, c(period / 4)),
        halfShifted = sq(0.5, {}, c(0));
      const h1 = computeDos(half.network, half.computation as DosComputation).dosPerMeVPerCell.total;
      const h2 = computeDos(halfShifted.network, halfShifted.computation as DosComputation).dosPerMeVPerCell.total;
      h1.forEach((x, i) => expect(Math.abs(x - h2[i])).toBeLessThan(1e-10));
    }
  });
  it("eigenphases of a finite periodic network at 1 - p are those at p turned by -pi/2", () => {
    const phases = (p: number) => {
      const { U, L } = torusOperator(periodicCell(sq(p).network, 0, 1), 4, 4);
      const ev = getKernels().eigGeneral(U, L);
      return Array.from({ length: L }, (_, i) => {
        let a = Math.atan2(ev[2 * i + 1], ev[2 * i]);
        if (a < 0) a += 2 * Math.PI;
        return a;
      }).sort((x, y) => x - y);
    };
    const a = phases(0.2)
        .map((x) => (x + (3 * Math.PI) / 2) % (2 * Math.PI))
        .sort((x, y) => x - y),
      b = phases(0.8);
    a.forEach((x, i) => expect(Math.min(Math.abs(x - b[i]), 2 * Math.PI - Math.abs(x - b[i]))).toBeLessThan(1e-8));
    // the map is not trivial: p = 0.2 and p = 0.35 differ
    const c = phases(0.35);
    expect(Math.max(...a.map((x, i) => Math.abs(x - c[i])))).toBeGreaterThan(1e-3);
  });
  it("the two localized limits: p = 0 and p = 1 are insulating in the bulk, p = 1/2 conducts", () => {
    const g = (p: number) => {
      const i = sq(p, { size: { columns: 20, rows: 6 } }, { kind: "conductance", energyMeV: 1.1 });
      return computeConductance(i.network, i.computation as ConductanceComputation).conductance.total;
    };
    // on a cylinder (no edges) both limits close every path into a plaquette loop: no transmission
    expect(g(0)).toBeLessThan(1e-12);
    expect(g(1)).toBeLessThan(1e-12);
    expect(g(0.5)).toBeGreaterThan(0.05);
  });
});

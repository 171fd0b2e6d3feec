import { describe, expect, it } from "vitest";
import { parseComputeInput, type SpectrumComputation } from "@/engine/schema";
import { blochMatrix, periodicCell, reciprocal, reverseCell, torusOperator, type PeriodicCell } from "@/engine/compute/spectrum-cell";
import { blochPhases, computeSpectrum } from "@/engine/compute/spectrum";
import { getKernels } from "@/engine/linalg/kernels";
import { triangularNodeMatrix } from "@/engine/network/node-matrices";
import { numpy, randomUnitary, split } from "./helpers/reference";
import { seededUniform } from "../../support/random";

const net = (extra: object = {}) =>
  parseComputeInput({
    network: {
      lattice: "triangular",
      size: { columns: 2, rows: 2 },
      periodNm: 150,
      node: { forward: 0.45, left: 0.35, right: 0.2, branch: -1, phaseRad: 0.4 },
      ...extra,
    },
    computation: { kind: "spectrum" },
  }).network;

const wrap = (a: number) => {
  let x = a % (2 * Math.PI);
  if (x < 0) x += 2 * Math.PI;
  return x;
};
function matchPhases(a: number[], b: number[]): number {
  const A = a.map(wrap).sort((x, y) => x - y),
    B = b.map(wrap).sort((x, y) => x - y);
  let worst = 0;
  for (let i = 0; i < A.length; i++) {
    const d = Math.abs(A[i] - B[i]);
    worst = Math.max(worst, Math.min(d, 2 * Math.PI - d));
  }
  return worst;
}

function torusCheck(cell: PeriodicCell, N1: number, N2: number): number {
  const { U, L } = torusOperator(cell, N1, N2);
  const ref = numpy({ op: "eigvals", n: L, ...split(U) });
  const torus = ref.re.map((re, i) => Math.atan2(ref.im[i], re));
  const { B1, B2 } = reciprocal(cell);
  const bloch: number[] = [];
  for (let i = 0; i < N1; i++)
    for (let j = 0; j < N2; j++) {
      const kx = (i / N1) * B1[0] + (j / N2) * B2[0],
        ky = (i / N1) * B1[1] + (j / N2) * B2[1];
      bloch.push(...blochPhases(cell, kx, ky).phases);
    }
  expect(bloch.length).toBe(torus.length);
  return matchPhases(bloch, torus);
}

describe("check 8: Bloch spectrum versus the eigenphases of a finite periodic closed network", () => {
  // Source: Bloch theorem; the finite torus operator is diagonalised independently by numpy.linalg.eigvals.
  it("triangular, zero flux, valleys K and K'", () => {
    const cell = periodicCell(net(), 0, 1);
    expect(torusCheck(cell, 4, 3)).toBeLessThan(1e-9);
    expect(torusCheck(reverseCell(cell), 3, 4)).toBeLessThan(1e-9);
  });
  it("triangular at flux 1/3 and 2/5 per triangle (magnetic cells of 3 and 5)", () => {
    expect(torusCheck(periodicCell(net(), 1, 3), 2, 3)).toBeLessThan(1e-9);
    expect(torusCheck(periodicCell(net(), 2, 5), 2, 2)).toBeLessThan(1e-9);
  });
  it("explicit 6 x 6 node with mixed channels, and the square network at flux 1/4", () => {
    expect(torusCheck(periodicCell(net({ channelsPerLink: 2, node: { matrix: randomUnitary(6, seededUniform(3)) } }), 1, 2), 2, 2)).toBeLessThan(1e-9);
    const sq = parseComputeInput({
      network: { lattice: "square", size: { columns: 2, rows: 2 }, periodNm: 100, node: { turning: 0.3 } },
      computation: { kind: "spectrum" },
    }).network;
    expect(torusCheck(periodicCell(sq, 1, 4), 2, 3)).toBeLessThan(1e-9);
  });
  it("the sign of k: a plane wave c_j exp(i k.R) with c an eigenvector of U(k) is an eigenvector of the torus operator", () => {
    // Source: physics.md section 3, U(k) = S diag(exp(-i k.a_j)); the wrong sign gives the spectrum at -k.
    const cell = periodicCell(net(), 0, 1);
    const N1 = 5,
      N2 = 4;
    const { U, L } = torusOperator(cell, N1, N2);
    const { B1, B2 } = reciprocal(cell);
    const kx = (1 / N1) * B1[0] + (3 / N2) * B2[0],
      ky = (1 / N1) * B1[1] + (3 / N2) * B2[1];
    const Uk = blochMatrix(cell, kx, ky);
    const ev = getKernels().eigGeneral(Uk, 3);
    const lam: [number, number] = [ev[0], ev[1]];
    // eigenvector by inverse iteration
    const A = Uk.slice();
    const mu: [number, number] = [lam[0] * (1 + 1e-9), lam[1] * (1 + 1e-9)];
    for (let i = 0; i < 3; i++) {
      A[2 * (i * 3 + i)] -= mu[0];
      A[2 * (i * 3 + i) + 1] -= mu[1];
    }
    let v = getKernels().solve(A, new Float64Array([1, 0, 0.3, 0.1, -0.2, 0.5]), 3, 1);
    v = getKernels().solve(A, v, 3, 1);
    const nrm = Math.sqrt(v.reduce((a, x) => a + x * x, 0));
    const residual = (sign: number) => {
      const x = new Float64Array(2 * L);
      for (let i = 0; i < N1; i++)
        for (let j = 0; j < N2; j++) {
          const Rx = i * cell.A1[0] + j * cell.A2[0],
            Ry = i * cell.A1[1] + j * cell.A2[1];
          const ph = sign * (kx * Rx + ky * Ry);
          for (let s = 0; s < 3; s++) {
            const idx = (i * N2 + j) * 3 + s,
              vr = v[2 * s] / nrm,
              vi = v[2 * s + 1] / nrm;
            x[2 * idx] = vr * Math.cos(ph) - vi * Math.sin(ph);
            x[2 * idx + 1] = vr * Math.sin(ph) + vi * Math.cos(ph);
          }
        }
      const y = getKernels().matmul(U, x, L, L, 1);
      let r = 0;
      for (let t = 0; t < L; t++)
        r = Math.max(r, Math.hypot(y[2 * t] - (lam[0] * x[2 * t] - lam[1] * x[2 * t + 1]), y[2 * t + 1] - (lam[0] * x[2 * t + 1] + lam[1] * x[2 * t])));
      return r;
    };
    expect(residual(+1)).toBeLessThan(1e-8);
    expect(residual(-1)).toBeGreaterThan(1e-3);
  });
  it("U(k) of the primitive triangular cell is S diag(exp(-i k.a_j))", () => {
    const n = net();
    const S = triangularNodeMatrix(0.45, 0.35, 0.2, -1, 0.4);
    const cell = periodicCell(n, 0, 1);
    const k = [0.7, -1.9];
    const a = [
      [1, 0],
      [-0.5, Math.sqrt(3) / 2],
      [-0.5, -Math.sqrt(3) / 2],
    ];
    const U = blochMatrix(cell, k[0], k[1]);
    for (let m = 0; m < 3; m++)
      for (let j = 0; j < 3; j++) {
        const ph = -(k[0] * a[j][0] + k[1] * a[j][1]);
        const re = S[2 * (m * 3 + j)] * Math.cos(ph) - S[2 * (m * 3 + j) + 1] * Math.sin(ph);
        const im = S[2 * (m * 3 + j)] * Math.sin(ph) + S[2 * (m * 3 + j) + 1] * Math.cos(ph);
        expect(U[2 * (m * 3 + j)]).toBeCloseTo(re, 14);
        expect(U[2 * (m * 3 + j) + 1]).toBeCloseTo(im, 14);
      }
  });
});

describe("spectrum computation", () => {
  it("energies are reduced into [0, period), sorted, 3 per channel per cell; Gamma-K-M-Gamma path", () => {
    const inp = parseComputeInput({
      network: { lattice: "triangular", size: { columns: 2, rows: 2 }, twistDegrees: 0.1, node: { forward: 0.5 } },
      computation: { kind: "spectrum", pathPointsPerSegment: 4 },
    });
    const r = computeSpectrum(inp.network, inp.computation as SpectrumComputation);
    expect(r.kPointsPerNm.length).toBe(13);
    expect(r.pathLabels?.map((p) => p.label)).toEqual(["Gamma", "K", "M", "Gamma"]);
    for (const e of r.energiesMeV) {
      expect(e.length).toBe(3);
      for (let i = 0; i < e.length; i++) {
        expect(e[i]).toBeGreaterThanOrEqual(0);
        expect(e[i]).toBeLessThan(r.energyPeriodMeV);
        if (i) expect(e[i]).toBeGreaterThanOrEqual(e[i - 1]);
      }
    }
    // valley K' at k is valley K at -k (time reversal)
    const back = computeSpectrum(inp.network, {
      ...(inp.computation as SpectrumComputation),
      kPointsPerNm: r.kPointsPerNm.map(([x, y]) => [-x, -y] as [number, number]),
    });
    r.valleyKPrimeEnergiesMeV?.forEach((e, i) => e.forEach((x, b) => expect(x).toBeCloseTo(back.energiesMeV[i][b], 9)));
    expect(r.checks.maxUnitarityDefect).toBeLessThan(1e-10);
  });
  it("check 5 for the spectrum: at fixed k the triangular spectrum is periodic in the flux per triangle", () => {
    // Source: exact gauge periodicity (every link phase is a whole multiple of 2 pi phi in the engine's gauge).
    const inp = parseComputeInput({
      network: { lattice: "triangular", size: { columns: 2, rows: 2 }, periodNm: 100, node: { forward: 0.3, left: 0.5, right: 0.2 } },
      computation: {
        kind: "spectrum",
        flux: { numerator: 1, denominator: 3 },
        kPointsPerNm: [
          [0.003, 0.011],
          [0.02, -0.004],
        ],
      },
    });
    const a = computeSpectrum(inp.network, inp.computation as SpectrumComputation);
    const b = computeSpectrum(inp.network, { ...(inp.computation as SpectrumComputation), flux: { numerator: 4, denominator: 3 } });
    const c = computeSpectrum(inp.network, { ...(inp.computation as SpectrumComputation), flux: { numerator: -2, denominator: 3 } });
    a.energiesMeV.forEach((e, i) =>
      e.forEach((x, j) => {
        expect(x).toBeCloseTo(b.energiesMeV[i][j], 9);
        expect(x).toBeCloseTo(c.energiesMeV[i][j], 9);
      }),
    );
    expect(a.energiesMeV[0].length).toBe(9);
  });
});

describe("magnetic unit cell fluxes", () => {
  // Source: Stokes theorem; every elementary triangle holds flux p/q (up triangles counter-clockwise).
  it("every directed triangle of the periodic cell carries +-2 pi p/q", () => {
    for (const [p, q] of [
      [1, 3],
      [2, 5],
      [-1, 4],
    ]) {
      const cell = periodicCell(net(), p, q);
      let count = 0;
      for (const l1 of cell.links)
        for (const l2 of cell.links.filter((l) => l.fromNode === l1.toNode))
          for (const l3 of cell.links.filter((l) => l.fromNode === l2.toNode && l.toNode === l1.fromNode)) {
            if (l1.shift[0] + l2.shift[0] + l3.shift[0] !== 0 || l1.shift[1] + l2.shift[1] + l3.shift[1] !== 0) continue;
            const s = l1.thetaB + l2.thetaB + l3.thetaB;
            const dx1 = l1.segment[2] - l1.segment[0],
              dy1 = l1.segment[3] - l1.segment[1],
              dx2 = l2.segment[2] - l2.segment[0],
              dy2 = l2.segment[3] - l2.segment[1];
            const d = s - Math.sign(dx1 * dy2 - dy1 * dx2) * 2 * Math.PI * (p / q);
            expect(Math.abs(Math.atan2(Math.sin(d), Math.cos(d)))).toBeLessThan(1e-9);
            count++;
          }
      expect(count).toBeGreaterThanOrEqual(2 * q);
    }
  });
});

// One run on several threads of the worker's pool (worker/helpers.ts, src/engine/compute/parallel.ts):
// both valleys and the ensemble samples are handed to the pool's free threads, and the result is
// the serial one (the same text, so every number equal, far inside 1e-12). A real piscina pool of
// two threads on worker/engine-thread.ts, no services.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Piscina } from "piscina";
import runEngine, { type EngineOutcome, type EngineTask } from "../../../worker/engine-thread";
import { offerHelpers } from "../../../worker/helpers";
import { createEnginePool } from "../../../worker/pool";
import { compute, createBoard, helpWithBoard, parseComputeInput, runBoard, type TransportJob } from "@/engine";
import { buildSample } from "@/engine/network/lattice";
import { reverseGraph } from "@/engine/network/graph";
import { sampleTransport } from "@/engine/compute/conductance";
import type { Network } from "@/engine/schema";
import { loadNativeKernels } from "@/engine/native";

const network = (W: number, extra: Record<string, unknown> = {}) => ({
  lattice: "triangular",
  size: { columns: W, rows: W },
  transverse: "periodic",
  twistDegrees: 0.11,
  node: { forward: 0.6, left: 0.25, right: 0.15 },
  disorder: { linkPhaseWidthRad: 6.283185307179586, seed: 3 },
  ...extra,
});

const control = () => new SharedArrayBuffer(16);

// OpenBLAS's thread count is one per process: the pool's threads set it to 1 when they load the
// kernels, which must not happen while this thread is inside a call on OpenBLAS's own threads
// (wrong numbers or a spinning thread server). So this thread runs at one OpenBLAS thread too, as
// every engine thread of the worker does.
const native = loadNativeKernels();
if (native.ok) native.addon.setThreads(1);

let pool: Piscina<EngineTask, EngineOutcome>;
beforeAll(() => {
  pool = createEnginePool(2, { execArgv: ["--import", "tsx"] });
});
afterAll(async () => {
  await pool.destroy();
});

/** A run as worker/runs.ts submits it: with a helpers port on the pool. */
async function pooled(input: unknown, parallelMinNodes = 0): Promise<EngineOutcome> {
  const c = control();
  const helpers = offerHelpers(pool, c);
  try {
    return await pool.run({ input, control: c, helpers: helpers.port, parallelMinNodes }, { transferList: [helpers.port] });
  } finally {
    helpers.close();
  }
}

/** Every number of two results, pairwise: the largest absolute difference (and the same shape). */
function maxDifference(a: unknown, b: unknown, where = "result"): number {
  if (typeof a === "number" && typeof b === "number") return a === b ? 0 : Math.abs(a - b);
  if (Array.isArray(a) && Array.isArray(b)) {
    expect(a.length, where).toBe(b.length);
    return a.reduce<number>((m, x, i) => Math.max(m, maxDifference(x, b[i], `${where}[${i}]`)), 0);
  }
  if (a && b && typeof a === "object" && typeof b === "object") {
    expect(Object.keys(a).sort(), where).toEqual(Object.keys(b).sort());
    return Object.keys(a).reduce(
      (m, k) => Math.max(m, maxDifference((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${where}.${k}`)),
      0,
    );
  }
  expect(a, where).toEqual(b);
  return 0;
}

/** The paths of the numbers that differ (for the failure message). */
function diffs(a: unknown, b: unknown, where = ""): [string, unknown, unknown][] {
  if (typeof a === "number") return a === b ? [] : [[where, a, b]];
  if (a && typeof a === "object")
    return Object.keys(a).flatMap((k) => diffs((a as Record<string, unknown>)[k], (b as Record<string, unknown>)?.[k], `${where}.${k}`));
  return [];
}

const cases: [string, unknown, number][] = [
  ["two valleys at T = 0", { network: network(32), computation: { kind: "conductance", energyMeV: 0.7, fieldTesla: 0.2 } }, 2],
  ["an ensemble of 5 samples, both valleys", { network: network(20), computation: { kind: "conductance", energyMeV: 0.4, ensemble: { samples: 5 } } }, 10],
  [
    "a thermal average (fixed rule), both valleys at every energy",
    { network: network(28), computation: { kind: "conductance", energyMeV: 0.4, temperatureK: 2, temperaturePoints: 4 } },
    2,
  ],
];

describe("the board (src/engine/compute/parallel.ts), without threads", () => {
  const input = parseComputeInput({ network: network(10), computation: { kind: "conductance", energyMeV: 0.4 } });
  const net = input.network as Network;
  const job: TransportJob = {
    network: net,
    fluxPerPlaquette: 0.01,
    maxEigenvalues: 64,
    pieces: [0, 1].flatMap((sample) => [
      { sample, valley: "K" as const, thetaE: 0.3, wantEigen: true, withCheck: true },
      { sample, valley: "K'" as const, thetaE: 0.3, wantEigen: true, withCheck: false },
    ]),
  };
  const serial = () =>
    job.pieces.map((p) => {
      const gK = buildSample(net, { mode: "leads", fluxPerPlaquette: job.fluxPerPlaquette, sample: p.sample });
      return sampleTransport(p.valley === "K" ? gK : reverseGraph(gK, false), p.thetaE, p.wantEigen, undefined, p.withCheck);
    });

  it("pieces a helper computed are read back exactly as computed here, and none is computed twice", () => {
    const board = createBoard(job);
    let meters = 0;
    const done = helpWithBoard(
      board,
      () => false,
      () => {
        meters++;
        return () => 0.25;
      },
    );
    expect(done).toBe(4);
    expect(meters).toBe(4);
    // every piece is taken: the requester computes none itself
    const out = runBoard(board, () => {
      throw new Error("a piece computed twice");
    });
    expect(out.helperPieces).toBe(4);
    expect(out.helperCpuSeconds).toBeCloseTo(1, 12);
    expect(out.results).toEqual(serial());
  });

  it("the requester computes every piece nobody took, in order; a late helper finds nothing to do", () => {
    const board = createBoard(job);
    const order: number[] = [];
    const ref = serial();
    const out = runBoard(board, (i) => {
      order.push(i);
      return ref[i];
    });
    expect(order).toEqual([0, 1, 2, 3]);
    expect(out.helperPieces).toBe(0);
    expect(
      helpWithBoard(
        board,
        () => false,
        () => () => 0,
      ),
    ).toBe(0);
  });

  it("compute without a runner is the serial engine (the board is only used when offered)", () => {
    expect(JSON.stringify(compute(input))).toBe(JSON.stringify(compute(input, { parallel: undefined })));
  });
});

describe("both valleys and the ensemble samples of one run on the pool's threads", () => {
  for (const [name, input, pieces] of cases) {
    it(`${name}: equal to the serial run, with pieces computed by a helper`, async () => {
      const serial = runEngine({ input, control: control() });
      expect(serial.outcome).toBe("succeeded");
      // a helper may find every piece already taken on a loaded machine: a few tries until one helped
      let parallel: EngineOutcome | null = null;
      for (let i = 0; i < 10 && !(parallel?.helped?.pieces ?? 0); i++) parallel = await pooled(input);
      if (!parallel || parallel.outcome !== "succeeded" || serial.outcome !== "succeeded") throw new Error(`not succeeded: ${JSON.stringify(parallel)}`);
      expect(parallel.helped?.pieces ?? 0).toBeGreaterThan(0);
      expect(parallel.helped?.pieces ?? 0).toBeLessThanOrEqual(pieces * 100);
      expect(parallel.helped?.cpuSeconds ?? 0).toBeGreaterThan(0);
      const a = JSON.parse(serial.resultJson) as Record<string, unknown>,
        b = JSON.parse(parallel.resultJson) as Record<string, unknown>;
      if (parallel.resultJson !== serial.resultJson) console.error(`differs: ${JSON.stringify(diffs(a, b))}`);
      expect(maxDifference(a, b)).toBeLessThanOrEqual(1e-12);
      expect(parallel.resultJson).toBe(serial.resultJson);
    });
  }

  it("small networks stay on one thread (below the hand-over size), with the same result", async () => {
    const input = cases[0][1];
    const out = await pooled(input, 1_000_000);
    expect(out.outcome).toBe("succeeded");
    expect(out.helped?.pieces).toBe(0);
    const serial = runEngine({ input, control: control() });
    if (out.outcome !== "succeeded" || serial.outcome !== "succeeded") throw new Error("not succeeded");
    expect(out.resultJson).toBe(serial.resultJson);
  });

  it("with no free thread (a pool of one) the run computes every piece itself: no wait, the same result", async () => {
    const single = createEnginePool(1, { execArgv: ["--import", "tsx"] });
    try {
      const input = cases[1][1];
      const c = control();
      const helpers = offerHelpers(single, c);
      const out = await single.run({ input, control: c, helpers: helpers.port, parallelMinNodes: 0 }, { transferList: [helpers.port] });
      helpers.close();
      const serial = runEngine({ input, control: control() });
      if (out.outcome !== "succeeded" || serial.outcome !== "succeeded") throw new Error("not succeeded");
      expect(out.helped?.pieces).toBe(0);
      expect(out.resultJson).toBe(serial.resultJson);
    } finally {
      await single.destroy();
    }
  });

  it("two runs at once on a pool of two (each waiting for no one): both equal to their serial results", async () => {
    const inputs = [cases[0][1], cases[1][1]];
    const outs = await Promise.all(inputs.map((input) => pooled(input)));
    for (let i = 0; i < inputs.length; i++) {
      const serial = runEngine({ input: inputs[i], control: control() });
      const out = outs[i];
      if (out.outcome !== "succeeded" || serial.outcome !== "succeeded") throw new Error("not succeeded");
      expect(out.resultJson).toBe(serial.resultJson);
    }
  });

  it("a cancelled run with helpers stops with `cancelled`", async () => {
    const c = control();
    Atomics.store(new Int32Array(c, 0, 1), 0, 1);
    const helpers = offerHelpers(pool, c);
    const out = await pool.run(
      {
        input: { network: network(24), computation: { kind: "conductance", ensemble: { samples: 4 } } },
        control: c,
        helpers: helpers.port,
        parallelMinNodes: 0,
      },
      { transferList: [helpers.port] },
    );
    helpers.close();
    expect(out.outcome).toBe("cancelled");
  });
});

/**
 * Independent pieces of one conductance computation (each valley of each sample at one energy)
 * computed on several threads, with results equal to the serial ones: every piece runs the same
 * function (`sampleTransport`) on the same graph, rebuilt from the network where it runs, and the
 * caller combines the results in the serial order.
 *
 * The pieces are published on a board in shared memory. Each piece has a state; a thread takes a
 * piece by changing its state from "open" with an atomic compare-and-exchange, so no piece is ever
 * computed twice. The thread that owns the computation (the requester) goes through the pieces in
 * order and computes every piece nobody took; it only waits for pieces another thread is actually
 * computing. So the requester never waits for a thread that is not there (a pool with no free
 * thread simply leaves every piece to it) and the helpers never wait at all.
 *
 * The engine itself has no threads: `ComputeOptions.parallel` (a `ParallelRunner`) is supplied by
 * the worker (worker/engine-thread.ts), which publishes the board to helper threads of its pool.
 * Without it, `compute` runs every piece in order on its own thread, as before.
 */
import { reverseGraph, type NetworkGraph } from "../network/graph";
import { buildSample } from "../network/lattice";
import type { Network } from "../schema";
import { EngineCancelledError } from "../errors";
import { sampleTransport, type SampleTransport } from "./conductance";
import { Progress } from "./progress";

/** One piece: one valley of one sample at one link phase (what `sampleTransport` takes). */
export interface TransportPiece {
  sample: number;
  valley: "K" | "K'";
  thetaE: number;
  wantEigen: boolean;
  withCheck: boolean;
}

/** Everything a helper thread needs to rebuild the graphs of a board's pieces. */
export interface TransportJob {
  network: Network;
  fluxPerPlaquette: number;
  pieces: TransportPiece[];
  /** Room for eigenvalues per piece (doubles). */
  maxEigenvalues: number;
}

/** A board in shared memory: the job (copied to each helper) and the SharedArrayBuffer of states and results. */
export interface TransportBoard {
  job: TransportJob;
  shared: SharedArrayBuffer;
}

/** Supplied by the worker: runs the pieces, some on other threads; `local(i)` computes piece i on this thread. */
export interface ParallelRunner {
  /** Fewest nodes of a valley graph for which the pieces are published at all (smaller ones cost less than the hand-over). */
  minNodes: number;
  run(job: TransportJob, local: (i: number) => SampleTransport, progress?: Progress): SampleTransport[];
}

// states of a piece
const OPEN = 0,
  TAKEN = 1,
  DONE = 2,
  MINE = 3,
  FAILED = 4;
// header (Int32): [0] helpers lost (the pool reported a helper task failed), [1] blocks absorbed by helpers (progress)
const HEADER = 2;
// per piece (Float64): transmission, injected, conservationError, noise, cpu seconds, eigenvalue count, eigenvalues...
const FIXED = 6;

function layout(n: number, maxEig: number) {
  const intBytes = 4 * (HEADER + n);
  const floatOffset = Math.ceil(intBytes / 8) * 8;
  return { floatOffset, stride: FIXED + maxEig, bytes: floatOffset + 8 * n * (FIXED + maxEig) };
}

export function createBoard(job: TransportJob): TransportBoard {
  return { job, shared: new SharedArrayBuffer(layout(job.pieces.length, job.maxEigenvalues).bytes) };
}

function views(board: TransportBoard) {
  const n = board.job.pieces.length;
  const { floatOffset, stride } = layout(n, board.job.maxEigenvalues);
  return {
    header: new Int32Array(board.shared, 0, HEADER),
    states: new Int32Array(board.shared, 4 * HEADER, n),
    floats: new Float64Array(board.shared, floatOffset, n * stride),
    stride,
  };
}

function write(board: TransportBoard, i: number, r: SampleTransport, cpuSeconds: number): void {
  const { floats, stride } = views(board);
  const o = i * stride;
  const eig = r.eigenvalues;
  if (eig && eig.length > board.job.maxEigenvalues) throw new Error(`parallel board: ${eig.length} eigenvalues, room for ${board.job.maxEigenvalues}`);
  floats[o] = r.transmission;
  floats[o + 1] = r.injected;
  floats[o + 2] = r.conservationError;
  floats[o + 3] = r.noise;
  floats[o + 4] = cpuSeconds;
  floats[o + 5] = eig ? eig.length : -1;
  if (eig) floats.set(eig, o + FIXED);
}

function read(board: TransportBoard, i: number): { result: SampleTransport; cpuSeconds: number } {
  const { floats, stride } = views(board);
  const o = i * stride;
  const nEig = floats[o + 5];
  return {
    result: {
      transmission: floats[o],
      injected: floats[o + 1],
      conservationError: floats[o + 2],
      noise: floats[o + 3],
      eigenvalues: nEig < 0 ? null : Array.from(floats.subarray(o + FIXED, o + FIXED + nEig)),
    },
    cpuSeconds: floats[o + 4],
  };
}

/** Counts a helper's absorbed blocks into the board (the requester reports them) and stops when asked to. */
class HelperProgress extends Progress {
  constructor(
    private readonly header: Int32Array,
    shouldCancel: () => boolean,
  ) {
    super(Infinity, { shouldCancel });
  }
  override tick(units = 1): void {
    Atomics.add(this.header, 1, units);
    super.tick(0);
  }
}

/** The graphs a helper thread built last (a thermal average asks for the same sample at many energies). */
const graphCache: { key: string; graph: NetworkGraph }[] = [];
function graphOf(job: TransportJob, piece: TransportPiece): NetworkGraph {
  const key = `${JSON.stringify(job.network)}\u0000${job.fluxPerPlaquette}\u0000${piece.sample}\u0000${piece.valley}`;
  const hit = graphCache.find((c) => c.key === key);
  if (hit) return hit.graph;
  const gK = buildSample(job.network, { mode: "leads", fluxPerPlaquette: job.fluxPerPlaquette, sample: piece.sample });
  // as computeConductance builds them: valley K' is the reversed graph, absorbed on the block path only
  const graph = piece.valley === "K" ? gK : reverseGraph(gK, false);
  graphCache.unshift({ key, graph });
  graphCache.length = Math.min(graphCache.length, 2);
  return graph;
}

/** Drops the graphs a helper thread keeps between boards (worker/engine-thread.ts calls it once the thread has been idle a moment). */
export function releaseGraphs(): void {
  graphCache.length = 0;
}

/**
 * A helper thread's share: take open pieces one by one and compute them, until none is open.
 * Returns the number of pieces computed. `meter()` starts a CPU meter of this thread (the worker's
 * clock); the seconds are written beside each result so the run is billed for them.
 */
export function helpWithBoard(board: TransportBoard, shouldCancel: () => boolean, meter: () => () => number): number {
  const { header, states } = views(board);
  const progress = new HelperProgress(header, shouldCancel);
  let done = 0;
  for (let i = 0; i < states.length; i++) {
    if (Atomics.compareExchange(states, i, OPEN, TAKEN) !== OPEN) continue;
    const spent = meter();
    try {
      const piece = board.job.pieces[i];
      const r = sampleTransport(graphOf(board.job, piece), piece.thetaE, piece.wantEigen, progress, piece.withCheck);
      write(board, i, r, spent());
      Atomics.store(states, i, DONE);
      done++;
    } catch (e) {
      // the requester computes it again itself (and meets the same error, or the cancellation, there)
      Atomics.store(states, i, FAILED);
      if (!(e instanceof EngineCancelledError)) console.error(`[engine helper] piece ${i}: ${(e as Error)?.message ?? String(e)}`);
    } finally {
      Atomics.notify(states, i);
    }
    if (shouldCancel()) break;
  }
  return done;
}

/** The worker tells the board that a helper task died (its thread crashed): pieces it held are computed by the requester. */
export function markHelpersLost(board: TransportBoard): void {
  const { header, states } = views(board);
  Atomics.store(header, 0, 1);
  for (let i = 0; i < states.length; i++) Atomics.notify(states, i);
}

/**
 * The requester's side: every piece in order, computed here unless a helper took it, then waited
 * for. Returns the results in order, how many helpers computed and the CPU seconds they spent on them.
 */
export function runBoard(
  board: TransportBoard,
  local: (i: number) => SampleTransport,
  progress?: Progress,
): { results: SampleTransport[]; helperPieces: number; helperCpuSeconds: number } {
  const { header, states } = views(board);
  const results: SampleTransport[] = [];
  let helperCpuSeconds = 0,
    helperPieces = 0,
    reported = 0;
  const report = () => {
    const ticks = Atomics.load(header, 1);
    if (ticks > reported) progress?.tick(ticks - reported);
    else progress?.tick(0); // checks cancellation
    reported = Math.max(reported, ticks);
  };
  for (let i = 0; i < states.length; i++) {
    if (Atomics.compareExchange(states, i, OPEN, MINE) === OPEN) {
      results.push(local(i));
      continue;
    }
    // taken by a helper: wait for it (50 ms at a time, reporting its progress and checking cancellation)
    for (;;) {
      const s = Atomics.load(states, i);
      if (s === DONE) {
        const r = read(board, i);
        results.push(r.result);
        helperCpuSeconds += r.cpuSeconds;
        helperPieces++;
        break;
      }
      if (s === FAILED || (s === TAKEN && Atomics.load(header, 0) === 1)) {
        results.push(local(i));
        break;
      }
      Atomics.wait(states, i, s, 50);
      report();
    }
  }
  report();
  return { results, helperPieces, helperCpuSeconds };
}

/**
 * Constants of the cost model (src/engine/cost.ts). Every timing figure below was calibrated on
 * this project's 2-core development machine (Intel Xeon, Node 20, OpenBLAS single-threaded) by
 * scripts/bench-cost.ts: `--calibrate` times the pieces (kernels, absorber steps, Bloch k points,
 * graph building, the resonance search) and prints the figures, the plain run checks the whole
 * model against the measured CPU time of every computation kind; src/engine/README.md records
 * the ratios. Figures are seconds of CPU time on one core; "multiply-add" is one complex
 * multiply-add.
 */

/** Backends the model knows: the native OpenBLAS kernels and the TypeScript kernels. */
export type CostBackend = "openblas" | "ts";

/** Timing figures of one kernel backend (what `getKernels()` runs). */
export interface KernelFigures {
  /** Rank-q update S += X W (gemmAccumulate, S nr x nc, X nr x q): per call, per entry of S (the
   * pass through memory), per multiply-add. Its rate grows with q and with the matrix size, and
   * saturates at 1 / gemmMulAddSeconds. */
  gemmCallSeconds: number;
  gemmEntrySeconds: number;
  gemmMulAddSeconds: number;
  /** Products (matmul): per call, per multiply-add. */
  matmulCallSeconds: number;
  matmulMulAddSeconds: number;
  /** Inverse of an n x n matrix: per call, and times n^3. */
  inverseCallSeconds: number;
  inverseCubeSeconds: number;
  /** Hermitian eigenvalues of an n x n matrix: per call, and times n^3. */
  eigHermitianCallSeconds: number;
  eigHermitianCubeSeconds: number;
  /** One Bloch k point of an n x n Bloch operator (U(k) built, general eigenproblem, phases):
   * per k point, times n^2, times n^3. */
  blochPointSeconds: number;
  blochSquareSeconds: number;
  blochCubeSeconds: number;
  /** The absorber's kernel calls over the same calls timed alone (its matrix S is strided, with
   * a leading dimension above nc, and colder in cache): a factor on the kernel terms of a sweep. */
  absorberKernelFactor: number;
}

export const KERNEL_FIGURES: Record<CostBackend, KernelFigures> = {
  // native OpenBLAS, one thread (what the worker runs): calibrated on this 2-core machine by
  // scripts/bench-cost.ts. --calibrate measures both backends in one run; the five gemm/matmul
  // figures and absorberKernelFactor come from one run (the quietest: its absorber fit is within
  // 0.78-1.11 over 92 sweeps), the others are medians of several runs, the Bloch figures checked
  // against the spectrum cases of the plain run.
  openblas: {
    gemmCallSeconds: 7.32e-7, // calibrated on this 2-core machine by scripts/bench-cost.ts
    gemmEntrySeconds: 1.54e-10, // calibrated on this 2-core machine by scripts/bench-cost.ts
    gemmMulAddSeconds: 1.32e-10, // calibrated on this 2-core machine by scripts/bench-cost.ts
    matmulCallSeconds: 1.24e-6, // calibrated on this 2-core machine by scripts/bench-cost.ts
    matmulMulAddSeconds: 1.92e-10, // calibrated on this 2-core machine by scripts/bench-cost.ts
    inverseCallSeconds: 3.18e-6, // calibrated on this 2-core machine by scripts/bench-cost.ts
    inverseCubeSeconds: 3.03e-10, // calibrated on this 2-core machine by scripts/bench-cost.ts
    eigHermitianCallSeconds: 8.82e-6, // calibrated on this 2-core machine by scripts/bench-cost.ts
    eigHermitianCubeSeconds: 5.31e-10, // calibrated on this 2-core machine by scripts/bench-cost.ts
    blochPointSeconds: 3.0e-6, // calibrated on this 2-core machine by scripts/bench-cost.ts
    blochSquareSeconds: 1.6e-7, // calibrated on this 2-core machine by scripts/bench-cost.ts
    blochCubeSeconds: 2.5e-9, // calibrated on this 2-core machine by scripts/bench-cost.ts
    absorberKernelFactor: 0.85, // calibrated on this 2-core machine by scripts/bench-cost.ts
  },
  // the TypeScript kernels (TRISKEL_KERNELS=ts, and below the absorber's thresholds on both):
  // calibrated on this 2-core machine by scripts/bench-cost.ts, as the native figures above.
  ts: {
    gemmCallSeconds: 9.03e-7, // calibrated on this 2-core machine by scripts/bench-cost.ts
    gemmEntrySeconds: 7.13e-10, // calibrated on this 2-core machine by scripts/bench-cost.ts
    gemmMulAddSeconds: 1.07e-9, // calibrated on this 2-core machine by scripts/bench-cost.ts
    matmulCallSeconds: 3.73e-6, // calibrated on this 2-core machine by scripts/bench-cost.ts
    matmulMulAddSeconds: 1.65e-9, // calibrated on this 2-core machine by scripts/bench-cost.ts
    inverseCallSeconds: 1.35e-6, // calibrated on this 2-core machine by scripts/bench-cost.ts
    inverseCubeSeconds: 2.51e-9, // calibrated on this 2-core machine by scripts/bench-cost.ts
    eigHermitianCallSeconds: 7.62e-6, // calibrated on this 2-core machine by scripts/bench-cost.ts
    eigHermitianCubeSeconds: 2.06e-9, // calibrated on this 2-core machine by scripts/bench-cost.ts
    blochPointSeconds: 1.68e-6, // calibrated on this 2-core machine by scripts/bench-cost.ts
    blochSquareSeconds: 2.8e-7, // calibrated on this 2-core machine by scripts/bench-cost.ts
    blochCubeSeconds: 7.05e-9, // calibrated on this 2-core machine by scripts/bench-cost.ts
    absorberKernelFactor: 0.98, // calibrated on this 2-core machine by scripts/bench-cost.ts
  },
};

export const COST_CONSTANTS = {
  /** Fixed overhead per computation (checks, the estimate itself, the result), seconds.
   * Calibrated on this 2-core machine by scripts/bench-cost.ts. */
  baseSeconds: 0.002,

  // --- slice composition (scattering/absorber.ts), the same TypeScript code on both backends ---
  /** The absorber sends the rank-q update to the backend when nr x nc exceeds this, and the
   * product G S[rho, :] when nc exceeds absorberBigProductColumns (not timing figures: they mirror
   * scattering/absorber.ts). */
  absorberBigUpdateEntries: 4096,
  absorberBigProductColumns: 64,
  /** Bookkeeping per absorbed group (slot classification, small arrays). Calibrated on this
   * 2-core machine by scripts/bench-cost.ts (the four absorber figures come from the same run as
   * the gemm/matmul figures; the split between per-group and per-slot is loose, their sum is not). */
  absorberGroupSeconds: 1.84e-6,
  /** Bookkeeping per node slot of a group. Calibrated on this 2-core machine by scripts/bench-cost.ts. */
  absorberSlotSeconds: 5.71e-7,
  /** Scalar TypeScript loops per multiply-add: new rows and columns, column removal. Calibrated
   * on this 2-core machine by scripts/bench-cost.ts. */
  absorberScalarSeconds: 7.29e-10,
  /** The q x q loop system (1 - M S) and its solve, per multiply-add. Calibrated on this 2-core
   * machine by scripts/bench-cost.ts. */
  absorberSmallSeconds: 2.77e-9,

  // --- graphs and per-evaluation bookkeeping ---
  /** Building a sample graph with its schedule, per node. Calibrated on this 2-core machine by
   * scripts/bench-cost.ts. */
  graphNodeSeconds: 2.44e-6,
  /** Time-reversed graph (valley K'), per node. Calibrated on this 2-core machine by scripts/bench-cost.ts. */
  reverseNodeSeconds: 9.45e-7,
  /** One more schedule (localization's column order), per node. Calibrated on this 2-core machine
   * by scripts/bench-cost.ts. */
  scheduleNodeSeconds: 2.98e-7,
  /** Per channel of one evaluation (link phases, lead lists, reading t). Calibrated on this
   * 2-core machine by scripts/bench-cost.ts. */
  evaluationChannelSeconds: 2.66e-8,
  /** Scalar loops outside the absorber (t^H t, T read at the cuts, LDOS blocks), per multiply-add
   * or entry. Calibrated on this 2-core machine by scripts/bench-cost.ts. */
  scalarSeconds: 1.77e-9,
  /** Reading one entry of a composed matrix (Absorber.entry: a call and a pair). Calibrated on
   * this 2-core machine by scripts/bench-cost.ts. */
  entryReadSeconds: 1.27e-8,
  /** LDOS: a checkpoint copy of the absorber's channel maps, per channel. Calibrated on this
   * 2-core machine by scripts/bench-cost.ts. */
  cloneChannelSeconds: 8.82e-9,

  // --- thermal average (compute/quadrature.ts, compute/resonance.ts) ---
  /** Work budget of the narrowest-resonance search (not a timing figure: mirrors compute/resonance.ts). */
  resonanceWorkBudget: 4e7,
  /** Seconds per unit of that work (one slot-pair of one node in one step). Calibrated on this
   * 2-core machine by scripts/bench-cost.ts. */
  resonanceUnitSeconds: 9.44e-9,
  /** Half-width of the narrowest resonance over the classical escape rate of the amplitude (half
   * the slowest decay rate of the probabilities). Calibrated on this 2-core machine by
   * scripts/bench-cost.ts (--calibrate prints the ratio: 0.46-0.55 in diffusive samples, 0.83 for
   * forward 0.9; localized samples have much narrower resonances than this predicts). */
  resonanceClassicalRatio: 0.5,
  /** Energies of the adaptive rule over its first panels (the refinements). Calibrated on this
   * 2-core machine by scripts/bench-cost.ts (the thermal cases print both: 1.08-1.10 in diffusive
   * samples, 1.35 for forward 0.9). */
  adaptiveRefinementFactor: 1.1,
  /** Hall bar (compute/hall-bar.ts): its composition on the general path with every terminal's
   * rows kept, over the replayed conductance sweep of valley K with reflection. Measured on this
   * 2-core machine on 2026-12-03 (triangular W x W open bars, one OpenBLAS thread, CPU time, least
   * of 3): the unscaled estimate was 0.52-0.63 of the CPU time at W = 32, 64, 96. */
  hallBarSweepFactor: 1.8,

  // --- Bloch DOS (compute/dos.ts) ---
  /** Broadened sum per eigenphase and energy (a Poisson kernel and its integral). Calibrated on
   * this 2-core machine by scripts/bench-cost.ts. */
  blochPhaseEnergySeconds: 6.1e-8,
  /** The sum-rule check per eigenphase (256 kernel values). Calibrated on this 2-core machine by
   * scripts/bench-cost.ts. */
  blochPhaseCheckSeconds: 3.03e-6,

  // --- memory and limits (not timing figures; unchanged) ---
  /** Bytes per channel and per node of a network graph (typed arrays). */
  graphBytesPerChannel: 96,
  graphBytesPerNode: 64,
  /** Memory of the Node.js process besides the computation (module code, heap baseline). */
  baselineBytes: 80 * 1024 * 1024,
  /** The peak memory limit of one computation (product.md: 2 GB). */
  memoryLimitBytes: 2 * 1024 * 1024 * 1024,
  /** The compute-time limit of one computation: 6 compute-hours (the Lab plan's largest job). */
  computeSecondsLimit: 6 * 3600,
};

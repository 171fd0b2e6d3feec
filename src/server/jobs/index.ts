/**
 * The job pipeline shared by every kind of work (runs, the points of sweeps, fits): submit ->
 * reserve budget (the kind's service) -> enqueue after commit (enqueue.ts) -> claim, finish once,
 * mark failed (lifecycle.ts) -> recover lost jobs (recovery.ts). Kinds: kinds.ts. The CPU clock
 * the compute threads bill by: cpu-clock.ts. docs/jobs.md walks through it.
 */
export { ENGINE_RUN_KINDS, JOB_KINDS, jobData, jobOptions, rowIdOf, type JobItem, type JobKind, type JobKindName } from "./kinds";
export { ENQUEUE_TIMEOUT_MS, enqueueAfterCommit, enqueueJobs, withTimeout } from "./enqueue";
export {
  cancelUnstarted,
  claimJobRow,
  finishJobRow,
  lockRunningRow,
  markJobFailed,
  requestCancel,
  requeueStaleRunning,
  unfinishedJobs,
  writeLedgerRow,
  type Executor,
  type UnfinishedJob,
} from "./lifecycle";
export { recoverLostJobs, type RecoveryOptions } from "./recovery";

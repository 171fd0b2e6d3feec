import type { Job } from "bullmq";

/** Maintenance jobs on the `system` queue. `ping` proves the queue end to end. */
export async function processSystemJob(job: Job): Promise<unknown> {
  switch (job.name) {
    case "ping":
      return { pong: true, echo: job.data ?? null, workerPid: process.pid, at: new Date().toISOString() };
    default:
      throw new Error(`unknown system job "${job.name}"`);
  }
}

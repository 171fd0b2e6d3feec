// Enqueue after commit (src/server/jobs/enqueue.ts): one job per row with job id = row id and the
// kind's data key; when Redis never answers the submission is not held past the timeout (fake
// timers, no waiting) and reports false, leaving the row to the recovery pass.
import { afterEach, describe, expect, it, vi } from "vitest";

const added: { queue: string; jobs: { name: string; data: unknown; opts: { jobId?: string; priority?: number } }[] }[] = [];
let hang = false;
vi.mock("@/server/queue", () => ({
  QUEUES: { runs: "runs", fits: "fits", system: "system" },
  getQueue: (name: string) => ({
    addBulk: (jobs: never[]) => {
      if (hang) return new Promise(() => {});
      added.push({ queue: name, jobs });
      return Promise.resolve(jobs);
    },
  }),
}));

const { enqueueAfterCommit, ENQUEUE_TIMEOUT_MS } = await import("../../../../src/server/jobs/enqueue");
const { JOB_KINDS, rowIdOf } = await import("../../../../src/server/jobs/kinds");

afterEach(() => {
  added.length = 0;
  hang = false;
  vi.useRealTimers();
});

describe("enqueue after commit", () => {
  it("adds one job per row on the kind's queue, job id = row id, the id under the kind's key", async () => {
    expect(await enqueueAfterCommit("fit", [{ id: "f-1", priority: 10 }])).toBe(true);
    expect(
      await enqueueAfterCommit("run", [
        { id: "r-1", priority: 1 },
        { id: "r-2", priority: 1 },
      ]),
    ).toBe(true);
    expect(added.map((a) => a.queue)).toEqual(["fits", "runs"]);
    expect(added[0].jobs).toEqual([
      expect.objectContaining({ name: "fit", data: { fitId: "f-1" }, opts: expect.objectContaining({ jobId: "f-1", priority: 10, attempts: 3 }) }),
    ]);
    expect(added[1].jobs.map((j) => [j.name, j.data, j.opts.jobId])).toEqual([
      ["run", { runId: "r-1" }, "r-1"],
      ["run", { runId: "r-2" }, "r-2"],
    ]);
    expect(rowIdOf(JOB_KINDS.fit, { id: "x", data: { fitId: "f-1" } })).toBe("f-1");
    expect(rowIdOf(JOB_KINDS.run, { id: "r-9", data: {} })).toBe("r-9");
  });

  it("gives up when Redis does not answer within the timeout and reports false", async () => {
    vi.useFakeTimers();
    hang = true;
    const error = vi.spyOn(console, "error").mockImplementation(() => {});
    let settled: boolean | undefined;
    const pending = enqueueAfterCommit("fit", [{ id: "f-2", priority: 10 }]).then((ok) => (settled = ok));
    await vi.advanceTimersByTimeAsync(ENQUEUE_TIMEOUT_MS - 1);
    expect(settled).toBeUndefined();
    await vi.advanceTimersByTimeAsync(1);
    await pending;
    expect(settled).toBe(false);
    expect(error.mock.calls[0][0]).toMatch(/recovery pass/);
    error.mockRestore();
  });
});

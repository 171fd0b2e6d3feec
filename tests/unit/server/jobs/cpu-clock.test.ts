// The CPU clock the compute threads bill by (src/server/jobs/cpu-clock.ts): the meter never goes
// negative, and on Linux the settle lets a short piece of work read a non-zero figure.
import { existsSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { cpuClock, startCpuMeter, type CpuClock } from "../../../../src/server/jobs/cpu-clock";

describe("cpu clock", () => {
  it("a meter reports the difference from its start and never a negative figure", () => {
    const readings = [10, 12.5, 9];
    const fake: CpuClock = { source: "wall", read: () => readings.shift()! };
    const spent = startCpuMeter(fake);
    expect(spent()).toBeCloseTo(2.5, 12);
    expect(spent()).toBe(0);
  });

  it.runIf(existsSync("/proc/thread-self/schedstat"))("on Linux it reads this thread's CPU time, and a short computation reads more than 0", () => {
    const clock = cpuClock();
    expect(clock.source).toBe("thread");
    const spent = startCpuMeter(clock);
    let x = 0;
    for (let i = 0; i < 2_000_000; i++) x += Math.sqrt(i);
    expect(x).toBeGreaterThan(0);
    expect(spent()).toBeGreaterThan(0);
  });
});

/**
 * Progress of a job on standard error while the command line waits: a bar redrawn in place when
 * the stream is a terminal, otherwise one line each time the status or the whole percentage changes
 * (so a log file gets a readable history and no control characters).
 */
import type { JobStatus, SweepCounts } from "@/shared/api";

export interface JobState {
  /** "calculation" (API: run) or "scan" (API: sweep). */
  noun: "calculation" | "scan";
  id: string;
  status: JobStatus;
  /** 0-1. */
  progress: number;
  /** A scan's points. */
  counts?: SweepCounts;
  pointCount?: number;
}

/** The words of one state, e.g. `scan 5c1d…: running 40% (4 of 10 points done)`. */
export function describeState(s: JobState): string {
  const pct = `${Math.floor(s.progress * 100)}%`;
  let text = `${s.noun} ${s.id}: ${s.status} ${pct}`;
  if (s.counts && s.pointCount !== undefined) {
    const done = s.counts.succeeded + s.counts.failed + s.counts.cancelled;
    text += ` (${done} of ${s.pointCount} points done${s.counts.failed ? `, ${s.counts.failed} failed` : ""})`;
  }
  return text;
}

const BAR_WIDTH = 24;

export class ProgressReporter {
  private last = "";
  private drawn = false;

  constructor(private readonly stream: NodeJS.WriteStream = process.stderr) {}

  get isTerminal(): boolean {
    return Boolean(this.stream.isTTY);
  }

  update(s: JobState): void {
    const line = describeState(s);
    if (!this.isTerminal) {
      if (line !== this.last) this.stream.write(`${line}\n`);
      this.last = line;
      return;
    }
    const filled = Math.round(Math.min(1, Math.max(0, s.progress)) * BAR_WIDTH);
    const bar = `[${"#".repeat(filled)}${"-".repeat(BAR_WIDTH - filled)}]`;
    const columns = this.stream.columns || 100;
    const text = `${bar} ${line}`.slice(0, columns - 1);
    this.stream.write(`\r\x1b[2K${text}`);
    this.drawn = true;
    this.last = line;
  }

  /** A line of its own (a message while waiting): the bar, if any, is ended first. */
  note(text: string): void {
    this.end();
    this.stream.write(`${text}\n`);
  }

  /** Ends the bar's line (nothing to do in line mode). */
  end(): void {
    if (this.drawn) this.stream.write("\n");
    this.drawn = false;
  }
}

"use client";

import { useEffect, useState } from "react";
import type { JobStatus, SweepCounts } from "@/shared/api";
import { elapsed } from "@/lib/units";
import { StatusBadge } from "@/components/ui/Status";

/** A scan's points in words: "12 done, 6 cancelled of 18" (only the states that occur). */
export function countsText(c: SweepCounts): string {
  const total = c.queued + c.running + c.succeeded + c.failed + c.cancelled;
  const parts = [
    `${c.succeeded} done`,
    c.failed ? `${c.failed} failed` : "",
    c.cancelled ? `${c.cancelled} cancelled` : "",
    c.running ? `${c.running} running` : "",
    c.queued ? `${c.queued} queued` : "",
  ].filter(Boolean);
  return `${parts.join(", ")} of ${total}`;
}

/**
 * Progress bar with status and elapsed time (ticking while the job is live). With a scan's counts,
 * the bar shows each share (done, failed, cancelled) and the figure counts the computed points
 * only: a cancelled scan never reads 100 %.
 */
export function Progress({
  status,
  progress,
  startedAt,
  createdAt,
  finishedAt,
  label,
  counts,
}: {
  status: JobStatus;
  progress: number;
  startedAt?: string | null;
  createdAt?: string;
  finishedAt?: string | null;
  label: string;
  counts?: SweepCounts;
}) {
  const live = status === "queued" || status === "running";
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    if (!live) return;
    const t = setInterval(() => setNow(Date.now()), 500);
    return () => clearInterval(t);
  }, [live]);
  const from = startedAt ?? createdAt;
  const to = finishedAt ? new Date(finishedAt).getTime() : now;
  const ms = from ? to - new Date(from).getTime() : 0;
  const total = counts ? counts.queued + counts.running + counts.succeeded + counts.failed + counts.cancelled : 0;
  const share = (n: number) => (total > 0 ? (n / total) * 100 : 0);
  // A scan: the computed share (a cancelled point is not done); a single calculation: its own progress.
  const computed = counts && total > 0 ? Math.max(0, Math.min(1, progress ?? 0)) - counts.cancelled / total : (progress ?? 0);
  const pct = Math.floor(Math.max(0, Math.min(1, computed)) * 100 + 1e-9);
  const shown = !counts && status === "cancelled" ? Math.min(pct, 99) : pct;
  return (
    <div className="space-y-1.5" data-testid="progress">
      <div className="flex flex-wrap items-center justify-between gap-2 text-caption text-fg-soft">
        <StatusBadge status={status} />
        <span className="tk-num font-mono">
          {counts ? (
            <>
              <span data-testid="sweep-counts">{countsText(counts)}</span> ·{" "}
            </>
          ) : null}
          <span data-testid="progress-percent">{shown}%</span>
          {status === "cancelled" ? " computed" : ""} · {status === "queued" ? "waiting " : ""}
          <span data-testid="elapsed">{elapsed(ms)}</span> {startedAt ? "elapsed" : "since submitted"}
        </span>
      </div>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={shown}
        aria-valuetext={counts ? countsText(counts) : `${shown}%`}
        className="flex h-2.5 overflow-hidden rounded-full bg-surface-sunk"
      >
        {counts ? (
          <>
            <div className="h-full bg-accent transition-[width] duration-500" style={{ width: `${share(counts.succeeded)}%` }} data-share="done" />
            <div className="h-full bg-danger transition-[width] duration-500" style={{ width: `${share(counts.failed)}%` }} data-share="failed" />
            <div
              className="h-full bg-line-strong transition-[width] duration-500"
              style={{
                width: `${share(counts.cancelled)}%`,
                backgroundImage: "repeating-linear-gradient(135deg, transparent 0 3px, rgba(255,255,255,0.45) 3px 6px)",
              }}
              data-share="cancelled"
              title={`${counts.cancelled} cancelled`}
            />
            <div className="h-full bg-accent/40 transition-[width] duration-500" style={{ width: `${share(counts.running)}%` }} data-share="running" />
          </>
        ) : (
          <div
            className={
              `h-full rounded-full transition-[width] duration-500 ` +
              `${status === "failed" ? "bg-danger" : status === "cancelled" ? "bg-line-strong" : "bg-accent"}`
            }
            style={{ width: `${shown}%` }}
          />
        )}
      </div>
    </div>
  );
}

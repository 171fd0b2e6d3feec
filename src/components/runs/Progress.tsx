"use client";

import { useEffect, useState } from "react";
import type { JobStatus } from "@/shared/api";
import { elapsed } from "@/lib/units";
import { StatusBadge } from "@/components/ui/Status";

/** Progress bar with status and elapsed time (ticking while the job is live). */
export function Progress({
  status,
  progress,
  startedAt,
  createdAt,
  finishedAt,
  label,
}: {
  status: JobStatus;
  progress: number;
  startedAt?: string | null;
  createdAt?: string;
  finishedAt?: string | null;
  label: string;
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
  const pct = Math.round(Math.max(0, Math.min(1, progress ?? 0)) * 100);
  return (
    <div className="space-y-1.5" data-testid="progress">
      <div className="flex flex-wrap items-center justify-between gap-2 text-caption text-fg-soft">
        <StatusBadge status={status} />
        <span className="tk-num font-mono">
          <span data-testid="progress-percent">{pct}%</span> · {status === "queued" ? "waiting " : ""}
          <span data-testid="elapsed">{elapsed(ms)}</span> {startedAt ? "elapsed" : "since submitted"}
        </span>
      </div>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={pct}
        className="h-2.5 overflow-hidden rounded-full bg-surface-sunk"
      >
        <div
          className={
            `h-full rounded-full transition-[width] duration-500 ` +
            `${status === "failed" ? "bg-danger" : status === "cancelled" ? "bg-line-strong" : "bg-accent"}`
          }
          style={{ width: `${pct}%` }}
        />
      </div>
    </div>
  );
}

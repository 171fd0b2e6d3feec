import type { JobStatus } from "@/shared/api";

const LOOK: Record<JobStatus, { label: string; cls: string; mark: string }> = {
  queued: { label: "Queued", cls: "bg-surface-sunk text-fg-soft", mark: "○" },
  running: { label: "Running", cls: "bg-warm-soft text-warm", mark: "◐" },
  succeeded: { label: "Succeeded", cls: "bg-accent-soft text-accent", mark: "●" },
  failed: { label: "Failed", cls: "bg-danger-soft text-danger", mark: "✕" },
  cancelled: { label: "Cancelled", cls: "bg-surface-sunk text-fg-faint", mark: "–" },
};

export function StatusBadge({ status }: { status: JobStatus | string }) {
  const look = LOOK[status as JobStatus] ?? { label: status, cls: "bg-surface-sunk text-fg-soft", mark: "?" };
  return (
    <span className={`inline-flex items-center gap-1 rounded-full px-2 py-0.5 text-caption font-medium ${look.cls}`} data-status={status}>
      <span aria-hidden>{look.mark}</span>
      {look.label}
    </span>
  );
}

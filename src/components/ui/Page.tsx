import type { ReactNode } from "react";

/** Page heading with an optional kicker line and actions on the right. */
export function PageHeader({ kicker, title, children, actions }: { kicker?: string; title: string; children?: ReactNode; actions?: ReactNode }) {
  return (
    <header className="mb-6 flex flex-wrap items-end justify-between gap-4 border-b border-line pb-4">
      <div>
        {kicker ? <p className="font-mono text-micro uppercase tracking-[0.18em] text-accent">{kicker}</p> : null}
        <h1 className="mt-1 text-title font-semibold">{title}</h1>
        {children ? <div className="mt-1 max-w-3xl text-body text-fg-soft">{children}</div> : null}
      </div>
      {actions ? <div className="flex items-center gap-2">{actions}</div> : null}
    </header>
  );
}

export function ErrorNote({ error, title = "Something went wrong" }: { error: unknown; title?: string }) {
  const message = error instanceof Error ? error.message : String(error);
  return (
    <div role="alert" className="rounded-card border border-danger/40 bg-danger-soft p-4 text-body text-danger">
      <p className="font-semibold">{title}</p>
      <p className="mt-1">{message}</p>
    </div>
  );
}

export function Empty({ children }: { children: ReactNode }) {
  return <div className="rounded-card border border-dashed border-line-strong p-8 text-center text-body text-fg-soft">{children}</div>;
}

export function Skeleton({ lines = 3 }: { lines?: number }) {
  return (
    <div role="status" aria-busy="true" aria-label="Loading" className="space-y-2">
      {Array.from({ length: lines }, (_, i) => (
        <div key={i} className="h-4 animate-pulse rounded bg-surface-sunk" style={{ width: `${90 - i * 12}%` }} />
      ))}
    </div>
  );
}

import Link from "next/link";
import type { ReactNode } from "react";

/** The frame of the sign-in, sign-up and invitation pages: a form card beside an ink panel. */
export function AuthFrame({ title, lead, children, aside }: { title: string; lead?: ReactNode; children: ReactNode; aside?: ReactNode }) {
  return (
    <main className="grid min-h-screen bg-paper text-ink md:grid-cols-[minmax(0,1fr)_minmax(0,0.9fr)]">
      <section className="flex flex-col px-gutter py-10 sm:px-12">
        <Link href="/" className="flex items-center gap-2 text-title font-semibold tracking-tight">
          <TriskelMark className="h-7 w-7 text-wall-700" />
          Triskel
        </Link>
        <div className="my-auto w-full max-w-sm py-12">
          <h1 className="text-title font-semibold">{title}</h1>
          {lead ? <p className="mt-2 text-body text-ink-faint">{lead}</p> : null}
          <div className="mt-8">{children}</div>
        </div>
      </section>
      <aside className="relative hidden overflow-hidden bg-ink text-paper md:flex md:flex-col md:justify-end md:p-12">
        <NetworkMotif className="absolute inset-0 h-full w-full text-wall-300 opacity-30" />
        <div className="relative max-w-sm">
          {aside ?? (
            <>
              <p className="font-mono text-caption uppercase tracking-widest text-spark-300">one-way channels</p>
              <p className="mt-3 text-lead">Networks, runs and fits live in a workspace: your own, or your lab&apos;s, shared with the people you invite.</p>
            </>
          )}
        </div>
      </aside>
    </main>
  );
}

export function TriskelMark({ className }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" className={className} aria-hidden="true" fill="none" stroke="currentColor" strokeWidth="2.4" strokeLinecap="round">
      <path d="M16 16c0-6 4-9 8-7" />
      <path d="M16 16c5 3 6 8 2 10" />
      <path d="M16 16c-5 3-10 1-10-3" />
    </svg>
  );
}

/** A field of directed links on a triangular lattice, drawn once (decorative). */
function NetworkMotif({ className }: { className?: string }) {
  const rows = 9;
  const cols = 7;
  const paths: string[] = [];
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < cols; c++) {
      const x = c * 80 + (r % 2 ? 40 : 0);
      const y = r * 70;
      paths.push(`M${x} ${y} l40 70`, `M${x} ${y} l80 0`, `M${x + 40} ${y + 70} l40 -70`);
    }
  }
  return (
    <svg viewBox="0 0 560 630" preserveAspectRatio="xMidYMid slice" className={className} aria-hidden="true">
      <g stroke="currentColor" strokeWidth="1.2" fill="none">
        {paths.map((d, i) => (
          <path key={i} d={d} strokeDasharray={i % 3 === 0 ? "6 5" : undefined} />
        ))}
      </g>
    </svg>
  );
}

import { Logo } from "@/components/shell/Logo";
import type { ReactNode } from "react";

/** The frame of the sign-in, sign-up and invitation pages: a form card beside an ink panel. */
export function AuthFrame({ title, lead, children, aside }: { title: string; lead?: ReactNode; children: ReactNode; aside?: ReactNode }) {
  return (
    <main className="grid min-h-screen bg-paper text-ink md:grid-cols-[minmax(0,1fr)_minmax(0,0.9fr)]">
      <section className="flex flex-col px-gutter py-10 sm:px-12">
        <Logo className="self-start text-title" />
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
              <p className="mt-3 text-lead">
                Networks, calculations and fits live in a group: your own, or your lab&apos;s, shared with the people you invite.
              </p>
            </>
          )}
        </div>
      </aside>
    </main>
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

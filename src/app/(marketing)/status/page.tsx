import type { Metadata } from "next";
import { SiteHeader } from "@/components/shell/SiteHeader";
import { healthReport } from "@/server/health";
import type { ServiceHealth } from "@/shared/api";
import { when } from "@/lib/units";

export const metadata: Metadata = { title: "Service status" };
export const dynamic = "force-dynamic";

const PARTS: { key: "database" | "queue"; name: string; role: string }[] = [
  { key: "database", name: "Database", role: "keeps networks, calculations, results, datasets, fits and the usage ledger" },
  { key: "queue", name: "Job queue", role: "hands calculations, scans and fits to the workers" },
];

function say(check: ServiceHealth): string {
  return check.status === "ok" ? `Working; answered in ${check.latencyMs} ms.` : `Not answering: ${check.message}`;
}

/** /status: the service's health in words (the same probe as GET /api/v1/health, which stays for machines). */
export default async function StatusPage() {
  const report = await healthReport();
  const ok = report.status === "ok";
  const checked = when(report.time);
  return (
    <main className="mx-auto max-w-4xl px-gutter py-10">
      <SiteHeader current="/status" />
      <h1 className="mt-10 text-display font-semibold">Service status</h1>
      <p className={`mt-4 text-lead ${ok ? "text-accent-strong" : "text-danger"}`} data-testid="status-summary" data-status={report.status}>
        {ok
          ? "Triskel is working: new calculations, scans and fits are accepted and run."
          : "Triskel is partly down: new work may be refused or wait until the parts below answer again. Nothing already stored is lost."}
      </p>
      <dl className="mt-8 divide-y divide-line rounded-card border border-line bg-surface">
        {PARTS.map((p) => (
          <div key={p.key} className="grid gap-1 px-4 py-3 sm:grid-cols-[12rem_1fr]">
            <dt className="font-medium">{p.name}</dt>
            <dd className="text-body" data-testid={`status-${p.key}`}>
              {say(report[p.key])} <span className="text-fg-soft">It {p.role}.</span>
            </dd>
          </div>
        ))}
      </dl>
      <p className="mt-6 text-caption text-fg-faint">
        Checked {checked}. Reload the page to check again. Scripts and monitors read the same check as JSON at{" "}
        {/* eslint-disable-next-line @next/next/no-html-link-for-pages -- a JSON endpoint; the /api catch-all makes the rule see a page */}
        <a href="/api/v1/health" className="underline">
          /api/v1/health
        </a>
        .
      </p>
    </main>
  );
}

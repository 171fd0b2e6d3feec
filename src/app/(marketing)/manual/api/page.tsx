import type { Metadata } from "next";
import { SiteHeader } from "@/components/shell/SiteHeader";
import { CardTable } from "@/components/ui/Table";
import { operationsInWords, type FieldWords, type OperationWords } from "@/server/openapi/words";

export const metadata: Metadata = {
  title: "API reference",
  description: "Every endpoint of the Triskel REST API: its parameters, body and answers, from the OpenAPI document at /api/v1/openapi.json.",
};

// Rendered on the server from the same document the API serves.
export const dynamic = "force-dynamic";

function Fields({ rows, caption }: { rows: FieldWords[]; caption: string }) {
  return (
    <CardTable className="my-3" caption={caption} columns={["Name", "Required", "Type and range", "Meaning"]}>
      {rows.map((f) => (
        <tr key={`${f.where ?? ""}${f.name}`} className="border-b border-line align-top last:border-0">
          <td className="whitespace-nowrap px-3 py-2 font-mono text-caption">
            {f.name}
            {f.where ? <span className="ml-1 text-fg-faint">({f.where})</span> : null}
          </td>
          <td className="px-3 py-2 text-caption">{f.required ? "yes" : "no"}</td>
          <td className="px-3 py-2 font-mono text-caption">{f.type}</td>
          <td className="px-3 py-2 text-caption text-fg-soft">{f.description}</td>
        </tr>
      ))}
    </CardTable>
  );
}

function Operation({ op }: { op: OperationWords }) {
  return (
    <section aria-labelledby={op.anchor} className="mt-8 border-t border-line pt-4">
      <h3 id={op.anchor} className="scroll-mt-6 font-mono text-lead">
        <span className="mr-2 rounded bg-surface-sunk px-1.5 py-0.5 text-caption font-semibold text-accent">{op.method}</span>
        {op.path}
      </h3>
      <p className="font-semibold">
        {op.summary}
        {op.public ? <span className="ml-2 text-caption font-normal text-fg-faint">no credentials needed</span> : null}
      </p>
      {op.description ? <p className="text-fg-soft">{op.description}</p> : null}
      {op.parameters.length ? <Fields rows={op.parameters} caption={`${op.method} ${op.path} parameters`} /> : null}
      {op.body ? (
        <>
          <p>
            Body ({op.body.mediaType}
            {op.body.required ? "" : ", optional"}):
          </p>
          {op.body.fields.length ? (
            <Fields rows={op.body.fields} caption={`${op.method} ${op.path} body`} />
          ) : (
            <p className="font-mono text-caption">{op.body.type}</p>
          )}
        </>
      ) : null}
      <p>Answers:</p>
      <ul className="mt-1 space-y-1 text-caption">
        {op.responses.map((r) => (
          <li key={r.status}>
            <span className="font-mono font-semibold">{r.status}</span> {r.description} <span className="font-mono text-fg-faint">{r.type}</span>
          </li>
        ))}
      </ul>
    </section>
  );
}

export default function ApiReferencePage() {
  const operations = operationsInWords();
  const tags = [...new Set(operations.map((o) => o.tag))];
  return (
    <div className="mx-auto max-w-6xl px-gutter py-10">
      <SiteHeader current="/manual" />
      <main className="mt-8 max-w-4xl text-body leading-relaxed [&_h2]:mt-12 [&_h2]:text-title [&_h2]:font-semibold [&_p]:mt-2">
        <p className="font-mono text-micro uppercase tracking-[0.18em] text-accent">manual · REST API reference</p>
        <h1 className="mt-2 text-display font-semibold">The API, endpoint by endpoint</h1>
        <p className="text-lead text-fg-soft">
          Every path under /api/v1 with its parameters, body and answers. The same facts for machines:{" "}
          <a href="/api/v1/openapi.json" className="text-accent underline">
            /api/v1/openapi.json
          </a>{" "}
          (OpenAPI 3.1, no sign-in needed).
        </p>
        <p>
          Send an API token as <span className="font-mono">Authorization: Bearer trk_…</span> (Group → API tokens), or call from a signed-in browser. A run is a
          calculation and a sweep a scan. Every error has the body <span className="font-mono">{"{ error: { code, message, details? } }"}</span>; each job
          answers its estimate in compute-seconds and USD before it is charged, and <span className="font-mono">?dryRun=true</span> gives the estimate without
          starting anything. Results are predictions of a phenomenological model, not measurements.
        </p>
        <nav aria-label="API sections" className="mt-4 flex flex-wrap gap-x-4 gap-y-1 text-caption">
          {tags.map((t) => (
            <a key={t} href={`#tag-${t.replace(/\W+/g, "-")}`} className="text-accent hover:underline">
              {t}
            </a>
          ))}
        </nav>
        {tags.map((t) => (
          <section key={t} aria-labelledby={`tag-${t.replace(/\W+/g, "-")}`}>
            <h2 id={`tag-${t.replace(/\W+/g, "-")}`}>{t}</h2>
            {operations
              .filter((o) => o.tag === t)
              .map((o) => (
                <Operation key={`${o.method} ${o.path}`} op={o} />
              ))}
          </section>
        ))}
      </main>
    </div>
  );
}

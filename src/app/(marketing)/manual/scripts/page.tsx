import type { Metadata } from "next";
import { readFileSync } from "node:fs";
import path from "node:path";
import { SiteHeader } from "@/components/shell/SiteHeader";
import { EXIT_CODES } from "@/client/api";
import { SCRIPT_EXAMPLES, type ScriptExample } from "@/client/examples";

export const metadata: Metadata = {
  title: "From a script",
  description: "Triskel from the command line and from Python: submit calculations and scans, wait with progress, fetch results, handle errors.",
};

// Rendered when the app is built: the examples are read from docs/examples/, the files the tests run.
export const dynamic = "force-static";

function source(e: ScriptExample): string {
  return readFileSync(path.join(process.cwd(), e.file), "utf8");
}

function Example({ e }: { e: ScriptExample }) {
  return (
    <figure className="mt-4" data-example={e.file}>
      <figcaption className="text-caption text-fg-soft">
        <span className="font-semibold text-fg">{e.title}</span> · <span className="font-mono">{e.file}</span> · {e.about}
      </figcaption>
      {/* focusable, so a keyboard can scroll a wide example */}
      <pre
        tabIndex={0}
        aria-label={e.file}
        className="mt-1.5 overflow-x-auto rounded-field border border-line bg-surface-sunk p-3 font-mono text-caption leading-5"
      >
        <code>{source(e)}</code>
      </pre>
    </figure>
  );
}

const example = (file: string) => SCRIPT_EXAMPLES.find((e) => e.file === file) as ScriptExample;

const COMMANDS: [string, string][] = [
  ["compute FILE.json", "the engine on your machine; prints the result as JSON (no service, no token)"],
  ["submit FILE.json", "sends the same file to the service and waits; prints the finished calculation or scan as the API returns it"],
  ["submit FILE.json --csv PATH", "for a scan: also writes its results table (CSV, units in the # lines)"],
  ["submit FILE.json --no-wait", "prints the new id and returns at once"],
  ["submit FILE.json --dry-run", "prints the estimate (compute-seconds and USD) and submits nothing"],
  ["status ID", "prints a calculation or a scan as it stands now"],
  ["cancel ID", "cancels it; compute-seconds already spent are kept and billed"],
  ["fetch ID [--csv PATH]", "waits for it, then prints its result file: a calculation's result.json, a scan's CSV"],
];

export default function ScriptsPage() {
  return (
    <div className="mx-auto max-w-6xl px-gutter py-10">
      <SiteHeader current="/manual" />
      <main
        className={
          "mx-auto mt-8 min-w-0 max-w-3xl text-body leading-relaxed " +
          "[&_h2]:mt-12 [&_h2]:scroll-mt-6 [&_h2]:text-title [&_h2]:font-semibold [&_h3]:mt-6 [&_h3]:text-lead [&_h3]:font-semibold [&_p]:mt-3"
        }
      >
        <p className="font-mono text-micro uppercase tracking-[0.18em] text-accent">manual · from a script</p>
        <h1 className="mt-2 text-display font-semibold">Triskel from a script</h1>
        <p className="text-lead text-fg-soft">
          The command line and a Python client talk to the same API as the web app. Every example on this page is run against a live service by the test suite.
        </p>
        <p>
          Both need the service&apos;s address and an API token of your group (<span className="font-mono">trk_…</span>, made on your group&apos;s page under
          API tokens). In the API a calculation is a <span className="font-mono">run</span> and a scan a <span className="font-mono">sweep</span>. Results are
          predictions of a phenomenological model, not measurements; each carries its checks and warnings. An estimate is available before anything is charged.
        </p>

        <h2 id="files">The input file</h2>
        <p>
          The file is the one <span className="font-mono">compute</span> takes. A saved network may stand in for the inline one:{" "}
          <span className="font-mono">{`{ "networkId": "…", "networkVersion": 2, "computation": {…} }`}</span>. A member{" "}
          <span className="font-mono">sweep</span> with <span className="font-mono">axes</span> (and optionally <span className="font-mono">ensemble</span> and{" "}
          <span className="font-mono">name</span>) makes it a scan.
        </p>
        <Example e={example("docs/examples/run.json")} />
        <Example e={example("docs/examples/scan.json")} />

        <h2 id="cli">The command line</h2>
        <p>
          From a clone of the repository: <span className="font-mono">npm run -s cli -- COMMAND</span>. The service comes from{" "}
          <span className="font-mono">TRISKEL_URL</span> and <span className="font-mono">TRISKEL_TOKEN</span>, or from <span className="font-mono">--url</span>{" "}
          and <span className="font-mono">--token</span>.
        </p>
        <table className="mt-3 w-full text-left text-caption">
          <caption className="sr-only">Commands</caption>
          <thead className="text-fg-soft">
            <tr>
              <th className="py-1 pr-4 font-semibold">command</th>
              <th className="py-1 font-semibold">what it does</th>
            </tr>
          </thead>
          <tbody>
            {COMMANDS.map(([c, what]) => (
              <tr key={c} className="border-t border-line">
                <td className="whitespace-nowrap py-1.5 pr-4 font-mono">{c}</td>
                <td className="py-1.5">{what}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p>
          While it waits, progress goes to standard error: a bar on a terminal, one line per change otherwise (a log stays readable). Ctrl-C asks whether to
          cancel the job; without a terminal the job is left running and its id printed. An id may be a calculation&apos;s or a scan&apos;s: the calculation is
          looked up first. Busy answers (429, 503) are waited out as the service asks.
        </p>
        <Example e={example("docs/examples/cli.sh")} />
        <h3 id="exit-codes">Exit codes</h3>
        <table className="mt-3 w-full text-left text-caption">
          <caption className="sr-only">Exit codes of the command line</caption>
          <tbody>
            {EXIT_CODES.map((e) => (
              <tr key={e.code} className="border-t border-line">
                <td className="w-12 py-1.5 pr-4 font-mono">{e.code}</td>
                <td className="py-1.5">{e.meaning}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p>Every error is one line on standard error, with the API&apos;s own message.</p>

        <h2 id="python">The Python client</h2>
        <p>
          One file, standard library only, Python 3.9 or later: download{" "}
          <a className="font-mono text-accent underline" href="/clients/triskel.py">
            /clients/triskel.py
          </a>{" "}
          and put it beside your script or notebook. <span className="font-mono">Client(url, token)</span> has <span className="font-mono">run</span>,{" "}
          <span className="font-mono">sweep</span>, <span className="font-mono">sweep_csv</span>, <span className="font-mono">estimate</span>,{" "}
          <span className="font-mono">cancel</span>, <span className="font-mono">upload_dataset</span>, <span className="font-mono">fit</span> and{" "}
          <span className="font-mono">get_run</span>, <span className="font-mono">get_sweep</span>, <span className="font-mono">get_fit</span>. Waiting returns
          the finished job as a dict; a job that fails or is cancelled raises. Errors raise <span className="font-mono">TriskelError</span> with{" "}
          <span className="font-mono">.status</span>, <span className="font-mono">.code</span> and <span className="font-mono">.message</span>.
        </p>
        <Example e={example("docs/examples/client.py")} />
      </main>
    </div>
  );
}

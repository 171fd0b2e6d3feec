/**
 * The remote commands of the command line: `submit`, `status`, `cancel` and `fetch` against a
 * Triskel service (docs/scripts.md). The file of `submit` is the file of `compute`; a `sweep`
 * member makes it a scan. Exit codes: EXIT in src/client/api.ts.
 */
import { writeFileSync } from "node:fs";
import { createInterface } from "node:readline";
import { readJsonFile } from "@/engine/cli-input";
import { refusalLine } from "@/engine/cli";
import { parseComputeInput } from "@/engine";
import { FINISHED_JOB_STATUSES, type RunDetail, type SweepDetail } from "@/shared/api";
import { ClientSetupError, EXIT, EXIT_CODES, RemoteApiError, TriskelClient } from "./api";
import { describeState, ProgressReporter, type JobState } from "./progress";

export const USAGE = `usage: npm run -s cli -- COMMAND ...

  compute FILE.json                  the engine on this machine; prints the result (JSON)
  submit FILE.json [--csv PATH] [--no-wait] [--dry-run]
                                     sends the same file to a Triskel service and waits for it;
                                     prints the finished calculation (or scan) as the API returns it
  status ID                          prints a calculation or a scan as it stands now
  cancel ID                          cancels a calculation or a scan; prints it
  fetch ID [--csv PATH]              waits for it, then prints its result file: a calculation's
                                     result.json (what compute prints), a scan's results CSV

FILE.json is { "network": {...}, "computation": {...} } as for compute, or a saved network:
{ "networkId": "...", "networkVersion"?: N, "computation": {...} }; "-" reads standard input.
A member "sweep": { "axes": [...], "ensemble"?: { "samples": N }, "name"?: "..." } makes it a scan.
--csv PATH writes a scan's results CSV; --no-wait prints the new id and returns; --dry-run prints
the estimate (compute-seconds and USD) and submits nothing. IDs: a calculation's or a scan's
(the calculation is tried first). The service: --url URL or TRISKEL_URL (e.g. http://127.0.0.1:3000),
an API token: --token TOKEN or TRISKEL_TOKEN.

Progress goes to standard error; Ctrl-C while waiting asks whether to cancel the job (without a
terminal the job is left running, its id printed, exit 130).
Exit codes:
${EXIT_CODES.map((e) => `  ${String(e.code).padStart(3)}  ${e.meaning}`).join("\n")}
`;

/** An error found before or beside the API (usage, the file, the token): one line and its exit code. */
class CommandError extends Error {
  constructor(
    message: string,
    readonly exitCode: number = EXIT.invalid,
  ) {
    super(message);
  }
}

interface Flags {
  url?: string;
  token?: string;
  csv?: string;
  wait: boolean;
  dryRun: boolean;
  positional: string[];
}

const VALUE_FLAGS = ["--url", "--token", "--csv"] as const;
const ALLOWED: Record<string, string[]> = {
  submit: ["--url", "--token", "--csv", "--no-wait", "--dry-run"],
  status: ["--url", "--token"],
  cancel: ["--url", "--token"],
  fetch: ["--url", "--token", "--csv"],
};

function parseFlags(command: string, args: string[]): Flags {
  const flags: Flags = { wait: true, dryRun: false, positional: [] };
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (!a.startsWith("--") || a === "-") {
      flags.positional.push(a);
      continue;
    }
    const eq = a.indexOf("=");
    const name = eq < 0 ? a : a.slice(0, eq);
    if (!ALLOWED[command].includes(name)) throw new CommandError(`${command}: unknown option ${name}; allowed: ${ALLOWED[command].join(", ")}`);
    if ((VALUE_FLAGS as readonly string[]).includes(name)) {
      const value = eq < 0 ? args[++i] : a.slice(eq + 1);
      if (value === undefined || value === "") throw new CommandError(`${command}: ${name} needs a value`);
      flags[name.slice(2) as "url" | "token" | "csv"] = value;
    } else if (eq >= 0) {
      throw new CommandError(`${command}: ${name} takes no value`);
    } else if (name === "--no-wait") flags.wait = false;
    else if (name === "--dry-run") flags.dryRun = true;
  }
  const want = command === "submit" ? "FILE.json" : "ID";
  if (flags.positional.length !== 1) throw new CommandError(`${command}: give exactly one ${want} (npm run -s cli -- help)`);
  if (flags.dryRun && (!flags.wait || flags.csv)) throw new CommandError("submit: --dry-run submits nothing, so --no-wait and --csv do not apply");
  if (!flags.wait && flags.csv)
    throw new CommandError("submit: --csv writes the results of a finished scan, so it needs waiting (leave out --no-wait, or fetch ID --csv PATH later)");
  return flags;
}

function clientOf(flags: Flags, progress: ProgressReporter): TriskelClient {
  const url = flags.url ?? process.env.TRISKEL_URL;
  const token = flags.token ?? process.env.TRISKEL_TOKEN;
  if (!url) throw new CommandError("no service address: give --url URL or set TRISKEL_URL (for example http://127.0.0.1:3000)");
  if (!token)
    throw new CommandError("no API token: give --token TOKEN or set TRISKEL_TOKEN (a group's owner or member creates one under API tokens)", EXIT.auth);
  return new TriskelClient({
    url,
    token,
    onBusy: (status, seconds, message) => progress.note(`busy (${status}): waiting ${seconds} s as the service asks: ${message}`),
  });
}

type Job = { type: "run"; id: string; detail: RunDetail } | { type: "sweep"; id: string; detail: SweepDetail };

const nounOf = (type: Job["type"]) => (type === "run" ? "calculation" : "scan");

function stateOf(job: Job): JobState {
  if (job.type === "run") return { noun: "calculation", id: job.id, status: job.detail.status, progress: job.detail.progress };
  const d = job.detail;
  return { noun: "scan", id: job.id, status: d.status, progress: d.progress, counts: d.counts, pointCount: d.pointCount };
}

/** A calculation or, when there is none with this id, a scan (ids of both are UUIDs). */
async function findJob(client: TriskelClient, id: string): Promise<Job> {
  try {
    return { type: "run", id, detail: await client.call("GET /api/v1/runs/{id}", { params: { id } }) };
  } catch (e) {
    if (!(e instanceof RemoteApiError && e.status === 404)) throw e;
  }
  try {
    return { type: "sweep", id, detail: await client.call("GET /api/v1/sweeps/{id}", { params: { id } }) };
  } catch (e) {
    if (e instanceof RemoteApiError && e.status === 404) throw new RemoteApiError(404, "not_found", `no calculation or scan ${id} in this group`);
    throw e;
  }
}

async function refresh(client: TriskelClient, job: Job): Promise<Job> {
  return job.type === "run"
    ? { ...job, detail: await client.call("GET /api/v1/runs/{id}", { params: { id: job.id } }) }
    : { ...job, detail: await client.call("GET /api/v1/sweeps/{id}", { params: { id: job.id } }) };
}

async function cancelJob(client: TriskelClient, job: Pick<Job, "type" | "id">): Promise<Job> {
  return job.type === "run"
    ? { type: "run", id: job.id, detail: await client.call("POST /api/v1/runs/{id}/cancel", { params: { id: job.id } }) }
    : { type: "sweep", id: job.id, detail: await client.call("POST /api/v1/sweeps/{id}/cancel", { params: { id: job.id } }) };
}

const finished = (job: Job) => FINISHED_JOB_STATUSES.includes(job.detail.status);

/** Asks on the terminal; resolves true for y or yes. A second Ctrl-C answers no-and-leave (null). */
function ask(question: string): Promise<boolean | null> {
  return new Promise((resolve) => {
    const rl = createInterface({ input: process.stdin, output: process.stderr });
    rl.on("SIGINT", () => {
      rl.close();
      resolve(null);
    });
    rl.question(question, (answer) => {
      rl.close();
      resolve(/^\s*y(es)?\s*$/i.test(answer));
    });
  });
}

/**
 * Polls until the job finishes, with back-off (0.5 s growing to 5 s), reporting progress. Ctrl-C:
 * on a terminal, asks whether to cancel; otherwise leaves the job running and returns null.
 */
async function waitFor(client: TriskelClient, start: Job, progress: ProgressReporter): Promise<Job | null> {
  let job = start;
  let interrupted = false;
  let wake: (() => void) | null = null;
  const onSigint = () => {
    interrupted = true;
    wake?.();
  };
  process.on("SIGINT", onSigint);
  try {
    let delayMs = 500;
    for (;;) {
      progress.update(stateOf(job));
      if (finished(job)) return job;
      await new Promise<void>((resolve) => {
        const t = setTimeout(resolve, delayMs);
        wake = () => {
          clearTimeout(t);
          resolve();
        };
        if (interrupted) wake();
      });
      wake = null;
      delayMs = Math.min(delayMs * 1.5, 5000);
      if (interrupted) {
        interrupted = false;
        if (!process.stdin.isTTY) {
          progress.note(`interrupted: ${nounOf(job.type)} ${job.id} is left running (npm run -s cli -- fetch ${job.id} waits for it again)`);
          return null;
        }
        progress.end();
        const yes = await ask(`cancel the job? [y/N] `);
        if (yes === null) {
          progress.note(`${nounOf(job.type)} ${job.id} is left running`);
          return null;
        }
        if (yes) {
          job = await cancelJob(client, job);
          progress.note(`cancelling ${nounOf(job.type)} ${job.id}`);
          delayMs = 500;
        }
      }
      job = await refresh(client, job);
    }
  } finally {
    process.off("SIGINT", onSigint);
    progress.end();
  }
}

/** One line on standard error for a job that did not succeed. */
function failureLine(job: Job): string {
  const noun = nounOf(job.type);
  if (job.detail.status === "cancelled") return `${noun} ${job.id} was cancelled`;
  if (job.type === "run") return `${noun} ${job.id} failed: ${job.detail.error?.message ?? job.detail.error?.code ?? "no reason given"}`;
  const bad = job.detail.points.find((p) => p.status === "failed");
  const first = bad ? `; first: point ${bad.index} (${JSON.stringify(bad.coordinates)}): ${bad.error?.message ?? "no reason given"}` : "";
  return `${noun} ${job.id} failed: ${job.detail.counts.failed} of ${job.detail.pointCount} points failed${first}`;
}

const out = (text: string) => process.stdout.write(text.endsWith("\n") ? text : `${text}\n`);
const costText = (e: { computeSeconds: number; costUsd: number }) => `estimate ${e.computeSeconds.toPrecision(3)} compute-seconds, ${e.costUsd.toFixed(2)} USD`;

async function writeCsv(client: TriskelClient, id: string, path: string): Promise<void> {
  const csv = await client.file("GET /api/v1/sweeps/{id}/results.csv", { id });
  try {
    writeFileSync(path, csv);
  } catch (e) {
    throw new CommandError(`--csv: cannot write ${path}: ${(e as Error).message}`);
  }
}

/** The submission's body from the file: a run's, or a sweep's when it has a `sweep` member. */
function submission(json: unknown): { sweep: boolean; body: Record<string, unknown> } {
  if (typeof json !== "object" || json === null || Array.isArray(json))
    throw new CommandError('input: the file must hold one JSON object { "network" | "networkId", "computation", "sweep"? }');
  const { sweep, ...rest } = json as Record<string, unknown>;
  if (sweep === undefined) return { sweep: false, body: rest };
  if (typeof sweep !== "object" || sweep === null || Array.isArray(sweep))
    throw new CommandError('input: sweep: must be an object { "axes": [...], "ensemble"?, "name"? }');
  const s = sweep as Record<string, unknown>;
  const unknown = Object.keys(s).filter((k) => !["axes", "ensemble", "name"].includes(k));
  if (unknown.length) throw new CommandError(`input: sweep.${unknown[0]}: unknown member; allowed: axes, ensemble, name`);
  if (s.axes === undefined)
    throw new CommandError('input: sweep.axes: missing; list one or two axes, e.g. [{ "parameter": "fieldTesla", "from": 0, "to": 0.2, "points": 11 }]');
  const body: Record<string, unknown> = { ...rest, axes: s.axes };
  if (s.ensemble !== undefined) body.ensemble = s.ensemble;
  if (s.name !== undefined) body.name = s.name;
  return { sweep: true, body };
}

async function submit(flags: Flags, progress: ProgressReporter): Promise<number> {
  const read = readJsonFile(flags.positional[0]);
  if (!read.ok) throw new CommandError(read.line);
  const { sweep, body } = submission(read.json);
  if (flags.csv && !sweep) throw new CommandError("submit: --csv writes a scan's results; this file has no sweep member");
  // an inline network is checked here first, by the engine's own parser: the same line and exit
  // code 2 as `compute` on the same file, even with the service out of reach
  if (body.network !== undefined) {
    try {
      parseComputeInput({ network: body.network, computation: body.computation });
    } catch (e) {
      const refused = refusalLine(e);
      if (refused !== null) throw new CommandError(refused);
      throw e;
    }
  }
  const client = clientOf(flags, progress);
  if (flags.dryRun) {
    const dry = sweep
      ? await client.call("POST /api/v1/sweeps?dryRun=true", { json: body })
      : await client.call("POST /api/v1/runs?dryRun=true", { json: body });
    progress.note(`dry run: ${costText(dry.estimate)}; nothing submitted`);
    out(JSON.stringify(dry));
    return EXIT.done;
  }
  const created = sweep ? await client.call("POST /api/v1/sweeps", { json: body }) : await client.call("POST /api/v1/runs", { json: body });
  const type = sweep ? "sweep" : "run";
  progress.note(`${nounOf(type)} ${created.id} submitted (${costText(created.estimate)})`);
  if (!flags.wait) {
    out(created.id);
    return EXIT.done;
  }
  return follow(client, await refresh(client, { type, id: created.id } as Job), flags, progress, "detail");
}

/** Waits for the job, then prints it (`detail`) or its result file (`file`); the exit code. */
async function follow(client: TriskelClient, start: Job, flags: Flags, progress: ProgressReporter, print: "detail" | "file"): Promise<number> {
  const job = await waitFor(client, start, progress);
  if (!job) {
    out(start.id);
    return EXIT.interrupted;
  }
  if (flags.csv && job.type === "sweep") await writeCsv(client, job.id, flags.csv);
  const ok = job.detail.status === "succeeded";
  if (print === "detail") out(JSON.stringify(job.detail));
  else if (job.type === "sweep") {
    if (!flags.csv) out(await client.file("GET /api/v1/sweeps/{id}/results.csv", { id: job.id }));
  } else if (ok) out(await client.file("GET /api/v1/runs/{id}/result.json", { id: job.id }));
  if (ok) return EXIT.done;
  process.stderr.write(`${failureLine(job)}\n`);
  return EXIT.jobFailed;
}

/** Runs one remote command; returns the exit code (errors are printed as one line). */
export async function remoteCommand(command: string, args: string[]): Promise<number> {
  const progress = new ProgressReporter(process.stderr);
  try {
    const flags = parseFlags(command, args);
    if (command === "submit") return await submit(flags, progress);
    const client = clientOf(flags, progress);
    const id = flags.positional[0];
    if (command === "status") {
      const job = await findJob(client, id);
      progress.note(describeState(stateOf(job)));
      out(JSON.stringify(job.detail));
      return EXIT.done;
    }
    if (command === "cancel") {
      const job = await cancelJob(client, await findJob(client, id));
      progress.note(`cancel requested: ${describeState(stateOf(job))}`);
      out(JSON.stringify(job.detail));
      return EXIT.done;
    }
    const job = await findJob(client, id);
    if (flags.csv && job.type !== "sweep") throw new CommandError(`fetch: --csv writes a scan's results; ${id} is a calculation`);
    return await follow(client, job, flags, progress, "file");
  } catch (e) {
    progress.end();
    if (e instanceof CommandError) {
      process.stderr.write(`${e.message}\n`);
      return e.exitCode;
    }
    if (e instanceof ClientSetupError) {
      process.stderr.write(`${e.message}\n`);
      return EXIT.invalid;
    }
    if (e instanceof RemoteApiError) {
      const where = e.status ? ` (HTTP ${e.status} ${e.code})` : "";
      process.stderr.write(`${e.message.replace(/\s*\n\s*/g, " ")}${where}\n`);
      return e.exitCode;
    }
    process.stderr.write(`error: ${(e as Error).message}\n`);
    return EXIT.fault;
  }
}

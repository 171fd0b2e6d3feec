/**
 * What leaves Triskel as text: a scan's results CSV and the plain-text citation of a result. The
 * columns and the names in both come from the one quantity table (src/shared/quantities.ts).
 */
import type { SweepDetail } from "./api";
import { inputLine, inputRows } from "./inputs";
import { scanName } from "./kinds";
import { kindLabel } from "./kinds";
import { quantity, quantityText } from "./quantities";

/** The caution every export and citation carries. */
export const MODEL_CAUTION = "Model prediction of a phenomenological network model, not a measurement.";

export function csvCell(v: unknown): string {
  if (v === null || v === undefined) return "";
  const s = String(v);
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

const oneLine = (s: string) => s.replace(/[\r\n]+/g, " ");

/** A column of a scan's CSV: its name, what it holds in words, and how to read it from a point. */
interface Column {
  name: string;
  text: string;
  value: (p: SweepDetail["points"][number]) => unknown;
}

/** The scan's columns: identifiers, the axes, the point's state, then every result quantity once (an echoed axis is not repeated). */
export function sweepColumns(s: Pick<SweepDetail, "axes" | "points">): Column[] {
  const cols: Column[] = [
    { name: "point_index", text: "point number (row-major, first axis slowest)", value: (p) => p.index },
    ...s.axes.map((a) => ({
      name: quantity(a.parameter).column,
      text: quantityText(a.parameter),
      value: (p: SweepDetail["points"][number]) => p.coordinates[a.parameter],
    })),
    { name: "status", text: "point status", value: (p) => p.status },
    { name: "run_id", text: "the point's calculation (GET /api/v1/runs/{id})", value: (p) => p.runId },
    { name: quantity("computeSeconds").column, text: quantityText("computeSeconds"), value: (p) => p.computeSeconds },
  ];
  const seen = new Set(cols.map((c) => c.name));
  const keys = [...new Set(s.points.flatMap((p) => Object.keys(p.quantities ?? {})))];
  for (const key of keys) {
    const name = quantity(key).column;
    if (seen.has(name)) continue;
    seen.add(name);
    cols.push({ name, text: quantityText(key), value: (p) => p.quantities?.[key] });
  }
  cols.push({ name: "error", text: "why the point failed (empty unless it failed)", value: (p) => (p.error ? oneLine(p.error.message) : "") });
  return cols;
}

/** The scan's inputs in words (axes with units and values, the fixed inputs) for headers and pages. */
export function axisLine(a: SweepDetail["axes"][number]): string {
  const q = quantity(a.parameter);
  const v = a.values;
  const unit = q.unit ? ` ${q.unit}` : "";
  return `${quantityText(a.parameter)}: ${v.length} value${v.length === 1 ? "" : "s"} from ${v[0]}${unit} to ${v[v.length - 1]}${unit}`;
}

/** A scan's results as CSV: `#` lines with the inputs, the engine version, the input hash, the export time and the caution; one row per point. */
export function sweepCsv(
  s: Pick<
    SweepDetail,
    | "id"
    | "name"
    | "axes"
    | "points"
    | "input"
    | "networkId"
    | "networkName"
    | "networkVersion"
    | "engineVersion"
    | "inputHash"
    | "status"
    | "counts"
    | "pointCount"
    | "ensemble"
  >,
  opts: { engineVersion: string; exportedAt: Date; url?: string },
): string {
  const kind = s.input.computation.kind;
  const parameters = s.axes.map((a) => a.parameter);
  const cols = sweepColumns(s);
  const network = s.networkId
    ? `${s.networkName ?? "(unnamed)"} (id ${s.networkId}, version ${s.networkVersion ?? "?"})`
    : "given inline with the scan (not a saved network)";
  const lines = [
    `# Triskel scan ${s.id}: ${oneLine(scanName(s.name, parameters, kind))}`,
    ...(opts.url ? [`# url: ${opts.url}`] : []),
    `# computation: ${kindLabel(kind)} (${kind})${s.ensemble ? `; each point averages ${s.ensemble.samples} disorder seeds` : ""}`,
    ...s.axes.map((a, k) => `# axis ${k + 1}: ${axisLine(a)}`),
    `# network: ${oneLine(network)}`,
    `# fixed inputs: ${oneLine(inputLine(inputRows(s.input, parameters)))}`,
    `# engine version: ${s.engineVersion ?? opts.engineVersion}; input hash (sha256): ${s.inputHash}`,
    `# status: ${s.status}; points: ${s.counts.succeeded} of ${s.pointCount} succeeded, ${s.counts.failed} failed, ${s.counts.cancelled} cancelled`,
    `# exported: ${opts.exportedAt.toISOString()}`,
    `# columns: ${cols.map((c) => `${c.name} = ${c.text}`).join("; ")}`,
    `# column names end in their unit (field_T, energy_meV, conductance_e2h, resistance_ohm); _1 marks a pure number`,
    `# ${MODEL_CAUTION}`,
    cols.map((c) => c.name).join(","),
  ];
  for (const p of s.points) lines.push(cols.map((c) => csvCell(c.value(p))).join(","));
  return lines.join("\n") + "\n";
}

/** The plain-text citation of a result: title, group, date (UTC), URL, engine version, input hash and the caution. */
export function citation(c: { title: string; group: string; date: string; url: string; engineVersion: string | null; inputHash: string }): string {
  return [
    `${c.title}. ${c.group}, Triskel, ${c.date.slice(0, 10)} (UTC).`,
    c.url,
    `Engine version ${c.engineVersion ?? "unknown"}; input hash (sha256) ${c.inputHash}.`,
    MODEL_CAUTION,
  ].join("\n");
}

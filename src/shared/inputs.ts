/**
 * A calculation's inputs in words with their units, for the inputs block of every result page and
 * the `#` header of the exports: the network's fields and the computation's, flattened to dotted
 * keys and named from the one quantity table (src/shared/quantities.ts). Values are shown exactly
 * as stored (inputs are what the user gave, not rounded results).
 */
import { named, quantity } from "./quantities";

export interface InputRow {
  /** Where it lives: "network" or "computation". */
  part: "network" | "computation";
  key: string;
  /** "Magnetic field B (T)". */
  label: string;
  /** "0.35 T"; text for words and lists. */
  value: string;
}

function flatten(value: unknown, prefix: string, out: [string, unknown][]): void {
  if (value && typeof value === "object" && !Array.isArray(value)) {
    for (const [k, v] of Object.entries(value as Record<string, unknown>)) flatten(v, prefix ? `${prefix}.${k}` : k, out);
  } else if (value !== undefined) out.push([prefix, value]);
}

function valueText(key: string, v: unknown): string {
  if (typeof v === "number") {
    const unit = quantity(key).unit;
    return unit ? `${v} ${unit}` : String(v);
  }
  if (typeof v === "string" || typeof v === "boolean") return String(v);
  if (v === null) return "none";
  if (Array.isArray(v)) return v.length === 0 ? "none" : JSON.stringify(v);
  return String(v);
}

/** The rows of an input `{ network, computation }`; `skip` leaves out keys shown elsewhere (a scan's axes). */
export function inputRows(input: { network?: unknown; computation?: unknown }, skip: readonly string[] = []): InputRow[] {
  const rows: InputRow[] = [];
  for (const part of ["computation", "network"] as const) {
    const flat: [string, unknown][] = [];
    flatten(input[part], "", flat);
    for (const [key, v] of flat) {
      if (key === "kind" || skip.includes(key)) continue;
      rows.push({ part, key, label: named(quantity(key)), value: valueText(key, v) });
    }
  }
  return rows;
}

/** One line of plain text: "Energy E = 1.2 meV; Magnetic field B = 0.35 T; ...". */
export function inputLine(rows: InputRow[]): string {
  return rows.map((r) => `${r.label} = ${r.value}`).join("; ");
}

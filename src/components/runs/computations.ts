/**
 * What each computation asks for, in the order the run form shows it: field path in the
 * engine's computation schema, label, unit and default. The engine's schema validates the
 * object these fields build; this table only lays the form out.
 */
import { KINDS, type ComputationKind } from "@/shared/kinds";

/** The kinds and their labels live in src/shared/kinds.ts (the server names scans with them too). */
export { KINDS, type ComputationKind };

export interface FieldSpec {
  path: string;
  label: string;
  unit?: string;
  default?: number | string;
  /** Left blank: the field is omitted (the engine's default applies). */
  optional?: boolean;
  integer?: boolean;
  hint?: string;
  options?: { value: string; label: string }[];
  /** Only shown when this other field has this value. */
  when?: { path: string; value: string };
}

const energy: FieldSpec = { path: "energyMeV", label: "Energy E", unit: "meV", default: 0 };
const field: FieldSpec = { path: "fieldTesla", label: "Magnetic field B", unit: "T", default: 0 };

export const FIELDS: Record<ComputationKind, FieldSpec[]> = {
  conductance: [
    energy,
    field,
    { path: "temperatureK", label: "Temperature", unit: "K", default: 0, hint: "0 K: no thermal smearing" },
    { path: "contactOhms", label: "Contact resistance (series)", unit: "Ω", default: 0 },
    { path: "ensemble.samples", label: "Ensemble size", unit: "disorder seeds", optional: true, integer: true, hint: "blank: one sample" },
    { path: "histogramBins", label: "Histogram bins", default: 20, integer: true },
  ],
  spectrum: [
    { path: "flux.numerator", label: "Flux p (per plaquette)", unit: "h/e", default: 0, integer: true },
    { path: "flux.denominator", label: "Flux q", default: 1, integer: true, hint: "flux p/q flux quanta per plaquette" },
    { path: "pathPointsPerSegment", label: "Points per path segment", default: 24, integer: true, hint: "path Γ → K → M → Γ" },
  ],
  dos: [
    {
      path: "source",
      label: "Source",
      default: "bloch",
      options: [
        { value: "bloch", label: "Bloch spectrum (periodic, k-mesh)" },
        { value: "sample", label: "Finite sample (trace formula)" },
      ],
    },
    { path: "energies.fromMeV", label: "From", unit: "meV", optional: true, hint: "blank: one energy period from 0" },
    { path: "energies.toMeV", label: "To", unit: "meV", optional: true },
    { path: "energies.points", label: "Energy points", optional: true, integer: true },
    { path: "broadeningMeV", label: "Broadening", unit: "meV", optional: true, hint: "blank: period / 100" },
    { path: "flux.numerator", label: "Flux p", unit: "h/e", default: 0, integer: true, when: { path: "source", value: "bloch" } },
    { path: "flux.denominator", label: "Flux q", default: 1, integer: true, when: { path: "source", value: "bloch" } },
    { path: "kMesh", label: "k-mesh", unit: "points per direction", default: 48, integer: true, when: { path: "source", value: "bloch" } },
    { path: "fieldTesla", label: "Magnetic field B", unit: "T", default: 0, when: { path: "source", value: "sample" } },
  ],
  ldos: [energy, field, { path: "broadeningMeV", label: "Broadening", unit: "meV", optional: true }],
  hallBar: [
    energy,
    field,
    { path: "temperatureK", label: "Temperature", unit: "K", default: 0, hint: "0 K: no thermal smearing" },
    { path: "contactOhms", label: "Contact resistance (current path, series)", unit: "Ω", default: 0 },
    { path: "ensemble.samples", label: "Ensemble size", unit: "disorder seeds", optional: true, integer: true, hint: "blank: one sample" },
  ],
  localization: [
    energy,
    field,
    { path: "ensemble.samples", label: "Ensemble size", unit: "disorder seeds", default: 4, integer: true },
    { path: "fitFromColumns", label: "Fit from strip length", unit: "columns", optional: true, integer: true },
  ],
};

export type FormValues = Record<string, number | string>;

export function defaultsFor(kind: ComputationKind): FormValues {
  const out: FormValues = {};
  for (const f of FIELDS[kind]) if (f.default !== undefined) out[f.path] = f.default;
  return out;
}

export function isShown(f: FieldSpec, values: FormValues): boolean {
  return !f.when || String(values[f.when.path] ?? "") === f.when.value;
}

/** Builds the computation object from the form: blank optional fields are left out. */
export function buildComputation(kind: ComputationKind, values: FormValues): Record<string, unknown> {
  type Tree = { [key: string]: unknown };
  const out: Tree = { kind };
  for (const f of FIELDS[kind]) {
    if (!isShown(f, values)) continue;
    const v = values[f.path];
    if (v === undefined || v === "") continue;
    const keys = f.path.split(".");
    let cur = out;
    for (let i = 0; i < keys.length - 1; i++) cur = (cur[keys[i]] ??= {}) as Tree;
    cur[keys[keys.length - 1]] = f.options ? v : typeof v === "number" ? v : Number.isFinite(Number(v)) && String(v).trim() !== "" ? Number(v) : v;
  }
  return out;
}

/** Units and formatting helpers shared by forms, tables and plots. */

/** Graphene lattice constant, nm (common practice; physics.md section 4). */
export const GRAPHENE_LATTICE_NM = 0.246;
export const E2_OVER_H_SIEMENS = 3.874045865e-5;
export const H_OVER_E2_OHM = 25812.80745;

/** Moiré period l = a / (2 sin(theta / 2)), nm, from the twist angle in degrees. */
export function periodFromTwistNm(twistDegrees: number): number {
  const theta = (twistDegrees * Math.PI) / 180;
  return GRAPHENE_LATTICE_NM / (2 * Math.sin(theta / 2));
}

/** Inverse of periodFromTwistNm: twist angle in degrees for a period in nm. */
export function twistFromPeriodDegrees(periodNm: number): number {
  return ((2 * Math.asin(GRAPHENE_LATTICE_NM / (2 * periodNm))) * 180) / Math.PI;
}

/** A number with a sensible number of significant digits (no trailing noise). */
export function num(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "–";
  if (x === 0) return "0";
  const a = Math.abs(x);
  if (a >= 1e5 || a < 1e-3) return x.toExponential(Math.max(0, digits - 1)).replace("e+", "e");
  return Number(x.toPrecision(digits)).toString();
}

export function withUnit(x: number | null | undefined, unit: string, digits = 4): string {
  const s = num(x, digits);
  return s === "–" ? s : `${s} ${unit}`;
}

/** Elapsed time as m:ss or h:mm:ss. */
export function elapsed(ms: number): string {
  const s = Math.max(0, Math.floor(ms / 1000));
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const sec = String(s % 60).padStart(2, "0");
  return h > 0 ? `${h}:${String(m).padStart(2, "0")}:${sec}` : `${m}:${sec}`;
}

export function computeSeconds(s: number | null | undefined): string {
  if (s === null || s === undefined || !Number.isFinite(s)) return "–";
  if (s < 60) return `${num(s, 3)} compute-s`;
  if (s < 3600) return `${num(s / 60, 3)} compute-min`;
  return `${num(s / 3600, 3)} compute-h`;
}

export function when(iso: string | null | undefined): string {
  if (!iso) return "–";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return d.toISOString().replace("T", " ").slice(0, 16) + " UTC";
}

/** Physical units of the parameters a sweep or a form can vary (key: parameter path). */
export const PARAMETER_UNITS: Record<string, { label: string; unit: string; symbol?: string }> = {
  energyMeV: { label: "Energy", unit: "meV", symbol: "E" },
  fieldTesla: { label: "Magnetic field", unit: "T", symbol: "B" },
  temperatureK: { label: "Temperature", unit: "K", symbol: "T" },
  contactOhms: { label: "Contact resistance", unit: "Ω", symbol: "R_c" },
  "node.forward": { label: "Forward probability", unit: "", symbol: "P_f" },
  "node.left": { label: "Left-turn probability", unit: "", symbol: "P_l" },
  "node.right": { label: "Right-turn probability", unit: "", symbol: "P_r" },
  "node.turning": { label: "Turning probability", unit: "", symbol: "p" },
  "disorder.seed": { label: "Disorder seed", unit: "" },
  "node.phaseRad": { label: "Node phase", unit: "rad", symbol: "χ" },
  "disorder.linkPhaseWidthRad": { label: "Link-phase disorder width", unit: "rad", symbol: "w" },
  "disorder.forwardSpread": { label: "Forward spread", unit: "", symbol: "δP_f" },
  periodNm: { label: "Moiré period", unit: "nm", symbol: "l" },
  twistDegrees: { label: "Twist angle", unit: "°", symbol: "θ" },
  modeVelocityMps: { label: "Mode velocity", unit: "m/s", symbol: "v" },
  "size.columns": { label: "Columns", unit: "cells" },
  "size.rows": { label: "Rows", unit: "cells" },
};

export function axisLabel(parameter: string): string {
  const p = PARAMETER_UNITS[parameter];
  if (!p) return parameter;
  return p.unit ? `${p.label} (${p.unit})` : p.label;
}

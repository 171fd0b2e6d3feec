/**
 * Units and formatting helpers shared by forms, tables and plots. The physical constants and the
 * twist/period conversion are the engine's (src/engine/constants.ts, browser-safe): import them
 * from there.
 */
import { PARAMETER_KEYS, QUANTITIES } from "@/shared/quantities";

/** A number with a sensible number of significant digits (no trailing noise). */
export function num(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "–";
  if (x === 0) return "0";
  const a = Math.abs(x);
  if (a >= 1e5 || a < 1e-3) return x.toExponential(Math.max(0, digits - 1)).replace("e+", "e");
  return Number(x.toPrecision(digits)).toString();
}

/**
 * A constant to `digits` significant figures for the reader: fixed when its exponent is below
 * `digits` (thousands grouped with `group` from five integer digits), else mantissa and power of ten.
 */
function significant(x: number, digits: number, group: string): { mantissa: string; exponent: number } {
  const [m, e] = x.toExponential(digits - 1).split("e");
  const exponent = Number(e);
  if (exponent < 0 || exponent >= digits) return { mantissa: m, exponent };
  const [int, frac] = x.toPrecision(digits).split(".");
  const grouped = int.length > 4 ? int.replace(/\B(?=(\d{3})+$)/g, group) : int;
  return { mantissa: frac === undefined ? grouped : `${grouped}.${frac}`, exponent: 0 };
}

const SUPERSCRIPT: Record<string, string> = {
  "-": "⁻",
  "0": "⁰",
  "1": "¹",
  "2": "²",
  "3": "³",
  "4": "⁴",
  "5": "⁵",
  "6": "⁶",
  "7": "⁷",
  "8": "⁸",
  "9": "⁹",
};

/** Plain text, e.g. 4.135667697 × 10⁻¹⁵ or 25 812.80746 (thin spaces). */
export function sigText(x: number, digits: number): string {
  const { mantissa, exponent } = significant(x, digits, "\u2009");
  return exponent === 0 ? mantissa : `${mantissa} × 10${[...String(exponent)].map((c) => SUPERSCRIPT[c]).join("")}`;
}

/** LaTeX, e.g. 3.874045865\times10^{-5} or 25\,812.80746. */
export function sigLatex(x: number, digits: number): string {
  const { mantissa, exponent } = significant(x, digits, "\\,");
  return exponent === 0 ? mantissa : `${mantissa}\\times10^{${exponent}}`;
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

/**
 * The app's one date format, on every page and table: a moment as "2026-12-04 01:20 UTC" (ISO
 * order, 24-hour clock, always UTC, so no reader mistakes the day, the month or the zone).
 */
export function when(iso: string | null | undefined): string {
  if (!iso) return "–";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return d.toISOString().replace("T", " ").slice(0, 16) + " UTC";
}

/** A calendar day in the same format, "2026-12-04" (the UTC date: billing periods, invoices). */
export function day(iso: string | null | undefined): string {
  if (!iso) return "–";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return d.toISOString().slice(0, 10);
}

/** Physical units of the parameters a sweep or a form can vary (key: parameter path), from the one quantity table (src/shared/quantities.ts). */
export const PARAMETER_UNITS: Record<string, { label: string; unit: string; symbol?: string }> = Object.fromEntries(
  PARAMETER_KEYS.map((k) => [k, { label: QUANTITIES[k].label, unit: QUANTITIES[k].unit, symbol: QUANTITIES[k].symbol }]),
);

export function axisLabel(parameter: string): string {
  const p = PARAMETER_UNITS[parameter];
  if (!p) return parameter;
  return p.unit ? `${p.label} (${p.unit})` : p.label;
}

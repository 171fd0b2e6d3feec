/**
 * Units a dataset's columns may be given in, and their conversion into the engine's units.
 * Pure; no I/O. The conductance quantum e^2/h is the engine's (src/engine/constants.ts, exact SI).
 */
import { CONDUCTANCE_QUANTUM_S } from "@/engine/browser";

export const X_UNITS = ["T", "mT", "V", "cm^-2"] as const;
export type XUnit = (typeof X_UNITS)[number];
export const Y_UNITS = ["S", "uS", "e2/h", "ohm", "kohm"] as const;
export type YUnit = (typeof Y_UNITS)[number];

/** What the x axis measures, and the unit it is stored in after conversion. */
export type XQuantity = "field" | "gateVoltage" | "density";
export const X_UNIT_INFO: Record<XUnit, { quantity: XQuantity; toCanonical: number; canonicalUnit: string; label: string }> = {
  T: { quantity: "field", toCanonical: 1, canonicalUnit: "T", label: "magnetic field (T)" },
  mT: { quantity: "field", toCanonical: 1e-3, canonicalUnit: "T", label: "magnetic field (mT)" },
  V: { quantity: "gateVoltage", toCanonical: 1, canonicalUnit: "V", label: "gate voltage (V)" },
  // Density is stored per m^2 (SI): 1 cm^-2 = 1e4 m^-2.
  "cm^-2": { quantity: "density", toCanonical: 1e4, canonicalUnit: "m^-2", label: "carrier density (cm^-2)" },
};

/** y is either a conductance or a resistance; both end up as conductance in e^2/h. */
export const Y_UNIT_INFO: Record<YUnit, { kind: "conductance" | "resistance"; toSi: number; label: string }> = {
  S: { kind: "conductance", toSi: 1, label: "conductance (S)" },
  uS: { kind: "conductance", toSi: 1e-6, label: "conductance (µS)" },
  "e2/h": { kind: "conductance", toSi: CONDUCTANCE_QUANTUM_S, label: "conductance (e²/h)" },
  ohm: { kind: "resistance", toSi: 1, label: "resistance (Ω)" },
  kohm: { kind: "resistance", toSi: 1e3, label: "resistance (kΩ)" },
};

/** Engine units of the stored curve: x as in X_UNIT_INFO.canonicalUnit, y conductance in e2/h. */
export const CANONICAL_Y_UNIT = "e2/h" as const;

export function convertX(value: number, unit: XUnit): number {
  return value * X_UNIT_INFO[unit].toCanonical;
}

/**
 * Converts one y value (and optionally its uncertainty, same unit) into a conductance in e^2/h.
 * Resistance R becomes G = 1/R; its uncertainty propagates as sigma_G = sigma_R / R^2 (first order).
 * Returns null for a resistance that is zero or negative (no conductance to convert into).
 */
export function convertY(value: number, unit: YUnit, sigma?: number): { g: number; sigma?: number } | null {
  const info = Y_UNIT_INFO[unit];
  if (unit === "e2/h") return sigma === undefined ? { g: value } : { g: value, sigma };
  if (info.kind === "conductance") {
    const g = (value * info.toSi) / CONDUCTANCE_QUANTUM_S;
    return sigma === undefined ? { g } : { g, sigma: (sigma * info.toSi) / CONDUCTANCE_QUANTUM_S };
  }
  const rOhm = value * info.toSi;
  if (!(rOhm > 0)) return null;
  const g = 1 / rOhm / CONDUCTANCE_QUANTUM_S;
  if (sigma === undefined) return { g };
  const sOhm = sigma * info.toSi;
  return { g, sigma: sOhm / (rOhm * rOhm) / CONDUCTANCE_QUANTUM_S };
}

/** Unit spellings accepted as a suffix inside a cell or in a column header, mapped to our units. */
const SPELLINGS: Record<string, XUnit | YUnit> = {
  t: "T",
  tesla: "T",
  mt: "mT",
  millitesla: "mT",
  v: "V",
  volt: "V",
  volts: "V",
  "cm^-2": "cm^-2",
  "cm-2": "cm^-2",
  "1/cm^2": "cm^-2",
  "1/cm2": "cm^-2",
  "/cm^2": "cm^-2",
  "/cm2": "cm^-2",
  s: "S",
  siemens: "S",
  us: "uS",
  µs: "uS",
  μs: "uS",
  "e2/h": "e2/h",
  "e^2/h": "e2/h",
  ohm: "ohm",
  ohms: "ohm",
  Ω: "ohm",
  kohm: "kohm",
  kohms: "kohm",
  kΩ: "kohm",
};

/** Recognises a unit spelling (case-insensitive except for T vs mT vs S, which lower-case fine). */
export function recogniseUnit(text: string): XUnit | YUnit | undefined {
  const t = text.trim();
  return SPELLINGS[t] ?? SPELLINGS[t.toLowerCase()];
}

/** All units of the same physical family as `unit` (a field column may not mix T and mT, etc.). */
export function isXUnit(u: string): u is XUnit {
  return (X_UNITS as readonly string[]).includes(u);
}
export function isYUnit(u: string): u is YUnit {
  return (Y_UNITS as readonly string[]).includes(u);
}

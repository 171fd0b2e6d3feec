/** Editing state of a network description (engine schema v1) and helpers around it. */
import type { NetworkShape } from "@/lib/lattice";
import { periodFromTwistNm } from "@/engine/browser";
import { squareNetwork, triangularNetwork } from "@/shared/networks";

/**
 * What the editor holds while the user types: any shape until the engine's schema accepts it
 * (validateNetwork), so the editor reads fields the way the form left them.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- a half-typed network has no type yet; the engine's schema checks it before use
export type NetworkDraft = Record<string, any>;

export function defaultNetwork(lattice: "triangular" | "square" = "triangular"): NetworkDraft {
  if (lattice === "square") return squareNetwork({ columns: 16, rows: 16 }, 0.5);
  return triangularNetwork({ columns: 12, rows: 8 }, { forward: 0.5, left: 0.25, right: 0.25 });
}

/** Whole numbers in 1..400 for the drawing, whatever is typed (the form shows the error). */
function side(v: unknown, fallback: number): number {
  const n = Math.floor(Number(v));
  return Number.isFinite(n) && n >= 1 ? Math.min(n, 400) : fallback;
}

export function shapeOf(d: NetworkDraft, valley: "K" | "K'"): NetworkShape {
  return {
    lattice: d.lattice === "square" ? "square" : "triangular",
    columns: side(d.size?.columns, 1),
    rows: side(d.size?.rows, 1),
    transverse: d.transverse === "open" ? "open" : "periodic",
    valley,
  };
}

export function linkLengthNm(d: NetworkDraft): number | undefined {
  if (typeof d.periodNm === "number" && d.periodNm > 0) return d.periodNm;
  if (typeof d.twistDegrees === "number" && d.twistDegrees > 0 && d.twistDegrees < 180) return periodFromTwistNm(d.twistDegrees);
  return undefined;
}

export function setPath(obj: NetworkDraft, path: string, value: unknown): NetworkDraft {
  const keys = path.split(".");
  const out: NetworkDraft = structuredClone(obj);
  let cur = out;
  for (let i = 0; i < keys.length - 1; i++) {
    cur[keys[i]] = cur[keys[i]] && typeof cur[keys[i]] === "object" ? cur[keys[i]] : {};
    cur = cur[keys[i]];
  }
  if (value === undefined) delete cur[keys[keys.length - 1]];
  else cur[keys[keys.length - 1]] = value;
  return out;
}

/**
 * The draft on the other lattice, keeping what still applies (engine schema v1): size, transverse
 * boundary, mode velocity, spin degeneracy, disorder and the link length (the square network has
 * no twist angle: a triangular network's scale becomes its period). The node, channels per link
 * and valley degeneracy start from the new lattice's defaults: the square network has its own
 * two-in, two-out node, one channel per link and no valleys.
 */
export function switchLattice(d: NetworkDraft, lattice: "triangular" | "square"): NetworkDraft {
  if ((d.lattice ?? "triangular") === lattice) return d;
  const out = defaultNetwork(lattice);
  for (const key of ["size", "transverse", "modeVelocityMps", "disorder"]) if (d[key] !== undefined) out[key] = structuredClone(d[key]);
  if (d.degeneracy?.spin !== undefined) out.degeneracy = { ...out.degeneracy, spin: d.degeneracy.spin };
  const l = linkLengthNm(d);
  if (l !== undefined) {
    delete out.twistDegrees;
    out.periodNm = Number(l.toFixed(2));
  }
  return out;
}

import { quantityPhrase } from "./quantities";

/** The computation kinds, in the order the forms show them, with their names in words: the one place for kind labels (pages, scan names, exports). */
export type ComputationKind = "conductance" | "spectrum" | "dos" | "ldos" | "localization" | "hallBar";

export const KINDS: { kind: ComputationKind; label: string; blurb: string }[] = [
  { kind: "conductance", label: "Conductance", blurb: "Two-terminal Landauer conductance per valley and in total, transmission eigenvalues, Fano factor." },
  { kind: "spectrum", label: "Band structure", blurb: "Bloch energies of the periodic network along a path through the Brillouin zone." },
  { kind: "dos", label: "Density of states", blurb: "Density of states versus energy, per moiré cell and per area, and the carrier density." },
  { kind: "ldos", label: "Local density of states", blurb: "Density of states on every link of the finite sample at one energy, drawn on the network." },
  { kind: "localization", label: "Localization length", blurb: "Decay of ln T along long strips: ξ and Λ = ξ / W." },
  {
    kind: "hallBar",
    label: "Hall bar",
    blurb:
      "Multi-terminal (Landauer–Büttiker) transport of an open-edged sample with side contacts: R_xx, R_xy, the two-terminal resistance and the conductance matrix. Default six-terminal bar; other contacts through the API or the command line.",
  },
];

/** A kind in words ("Density of states"); an unknown kind is returned as it is. */
export function kindLabel(kind: string): string {
  return KINDS.find((k) => k.kind === kind)?.label ?? kind;
}

/** A scan's title in words: "Conductance versus magnetic field (T) and energy (meV)". */
export function scanTitle(kind: string, parameters: string[]): string {
  return `${kindLabel(kind)} versus ${parameters.map(quantityPhrase).join(" and ")}`;
}

/**
 * The name a scan is listed under: a name its author gave is kept; none, or the raw default older
 * scans were given ("conductance versus fieldTesla and energyMeV"), becomes the title in words.
 */
export function scanName(name: string | null, parameters: string[], kind?: string): string {
  const legacy = name ? /^([A-Za-z]+) versus (.+)$/.exec(name) : null;
  if (legacy && KINDS.some((k) => k.kind === legacy[1]) && legacy[2] === parameters.join(" and ")) return scanTitle(legacy[1], parameters);
  if (name) return name;
  return kind ? scanTitle(kind, parameters) : parameters.map(quantityPhrase).join(" × ");
}

/** "1 axis", "2 axes"; "1 point", "18 points". */
export function countOf(n: number, one: string, many: string): string {
  return `${n.toLocaleString("en-US")} ${n === 1 ? one : many}`;
}

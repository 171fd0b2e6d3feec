/** Names and units of the scalar quantities a sweep's grid carries (dotted result paths). */
const KNOWN: Record<string, { label: string; unit: string }> = {
  "conductance.total": { label: "Conductance G", unit: "e²/h" },
  "conductance.valleyK": { label: "G, valley K per spin", unit: "e²/h" },
  "conductance.valleyKPrime": { label: "G, valley K′ per spin", unit: "e²/h" },
  "ensemble.mean.total": { label: "Ensemble mean G", unit: "e²/h" },
  "ensemble.mean.valleyK": { label: "Ensemble mean G, valley K", unit: "e²/h" },
  "ensemble.mean.valleyKPrime": { label: "Ensemble mean G, valley K′", unit: "e²/h" },
  siemens: { label: "Conductance", unit: "S" },
  "siemens.total": { label: "Conductance", unit: "S" },
  ohms: { label: "Resistance", unit: "Ω" },
  "ohms.total": { label: "Resistance", unit: "Ω" },
  fano: { label: "Fano factor", unit: "" },
  lambda: { label: "Λ = ξ / W", unit: "" },
  "resistances.longitudinalOhms": { label: "Longitudinal resistance R_xx", unit: "Ω" },
  "resistances.hallOhms": { label: "Hall resistance R_xy", unit: "Ω" },
  "resistances.twoTerminalOhms": { label: "Two-terminal resistance", unit: "Ω" },
  "ensemble.mean.longitudinalOhms": { label: "Ensemble mean R_xx", unit: "Ω" },
  "ensemble.mean.hallOhms": { label: "Ensemble mean R_xy", unit: "Ω" },
  "ensemble.mean.twoTerminalOhms": { label: "Ensemble mean two-terminal resistance", unit: "Ω" },
};

export function quantityLabel(name: string): { label: string; unit: string } {
  if (KNOWN[name]) return KNOWN[name];
  const last = name.split(".").pop() ?? name;
  const rules: [RegExp, string][] = [
    [/MeV$/, "meV"],
    [/Tesla$/, "T"],
    [/Nm$/, "nm"],
    [/Ohms?$/, "Ω"],
    [/Siemens$/, "S"],
  ];
  for (const [re, unit] of rules) if (re.test(last)) return { label: name, unit };
  return { label: name, unit: "" };
}

/** The quantity to show first: the ensemble mean if there is one, else the total conductance. */
export function preferredQuantity(names: string[]): string | null {
  for (const n of ["ensemble.mean.total", "conductance.total", "lambda", "ensemble.mean.longitudinalOhms", "resistances.longitudinalOhms"])
    if (names.includes(n)) return n;
  return names[0] ?? null;
}

/** The error-band partner of a quantity: ensemble.mean.X -> ensemble.stderr.X. */
export function errorQuantityFor(name: string, names: string[]): string | null {
  if (!name.startsWith("ensemble.mean.")) return null;
  const e = name.replace("ensemble.mean.", "ensemble.stderr.");
  return names.includes(e) ? e : null;
}

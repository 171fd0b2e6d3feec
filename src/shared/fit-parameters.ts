/**
 * What a fit may adjust: the parameters, with the bounds and starting values the fit form proposes
 * (src/components/data/FitForm.tsx); the server accepts only these names (src/server/fits/model.ts).
 */
export interface FitParameterInfo {
  parameter: string;
  /** A few words, for tables and lists. */
  short: string;
  label: string;
  unit: string;
  initial: number;
  min: number;
  max: number;
}
export const FIT_PARAMETERS: FitParameterInfo[] = [
  {
    parameter: "node.forward",
    short: "node forward probability",
    label: "node forward probability (left and right keep their ratio)",
    unit: "",
    initial: 0.6,
    min: 0.12,
    max: 0.98,
  },
  { parameter: "modeVelocityMps", short: "mode velocity", label: "mode velocity", unit: "m/s", initial: 1.0e6, min: 1e5, max: 3e6 },
  { parameter: "periodNm", short: "moiré period", label: "moire period", unit: "nm", initial: 128, min: 20, max: 400 },
  { parameter: "twistDegrees", short: "twist angle", label: "twist angle", unit: "°", initial: 0.11, min: 0.03, max: 0.7 },
  { parameter: "contactOhms", short: "contact resistance", label: "series contact resistance", unit: "Ω", initial: 500, min: 0, max: 20000 },
  { parameter: "temperatureK", short: "temperature", label: "temperature (thermal smearing)", unit: "K", initial: 1, min: 0, max: 30 },
  {
    parameter: "node.phaseRad",
    short: "node phase",
    label: "overall node phase chi (shifts the energy of every node alike)",
    unit: "rad",
    initial: 0,
    min: -3.141592653589793,
    max: 3.141592653589793,
  },
  {
    parameter: "disorder.forwardSpread",
    short: "forward spread",
    label: "spread of the node forward probability from node to node (disorder)",
    unit: "",
    initial: 0.05,
    min: 0,
    max: 0.2,
  },
  {
    parameter: "disorder.linkPhaseWidthRad",
    short: "link phase disorder",
    label: "link phase disorder width",
    unit: "rad",
    initial: 0.5,
    min: 0,
    max: 6.283185307179586,
  },
];
export const FITTABLE = FIT_PARAMETERS.map((p) => p.parameter);

/** The schema entry of a fitted parameter by its code name (undefined for a name the fit does not know). */
export function fitParameterInfo(parameter: string): FitParameterInfo | undefined {
  return FIT_PARAMETERS.find((p) => p.parameter === parameter);
}

/** A parameter in words with its unit, e.g. "contact resistance (Ω)"; the code name when unknown. */
export function fitParameterName(parameter: string): string {
  const p = fitParameterInfo(parameter);
  return p ? `${p.short}${p.unit ? ` (${p.unit})` : ""}` : parameter;
}

/** Sweep parameters a dataset's x may map to, by what the x axis measures. */
export const SWEEP_FOR_QUANTITY: Record<string, string[]> = { field: ["fieldTesla"], gateVoltage: [], density: [] };

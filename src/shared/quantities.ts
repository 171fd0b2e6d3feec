/**
 * Every quantity a page or an export names: the scan axes (computation and network fields) and the
 * scalar leaves of every engine result (dotted paths, as `scalarQuantities` flattens them), each in
 * words with its unit and its CSV column name. The result pages, the scan pages and the CSV
 * exports all read this one table.
 *
 * CSV column rule: snake_case words, then `_` and the unit's suffix (UNITS below): `field_T`,
 * `energy_meV`, `conductance_e2h`, `resistance_ohm`, `dos_per_meV_nm2`; `_1` marks a pure number
 * (probabilities, ratios, counts). Identifier columns (`point_index`, `status`, `run_id`) carry none.
 */

/** Display unit -> CSV suffix. A quantity's unit must be one of these. */
export const UNITS = {
  "": "1",
  meV: "meV",
  T: "T",
  K: "K",
  Ω: "ohm",
  S: "S",
  "e²/h": "e2h",
  nm: "nm",
  rad: "rad",
  "°": "deg",
  "m/s": "m_per_s",
  "h/e": "h_per_e",
  "nm²": "nm2",
  "cm⁻²": "per_cm2",
  "1/meV": "per_meV",
  "1/nm": "per_nm",
  "1/(meV·cell)": "per_meV_cell",
  "1/(meV·nm²)": "per_meV_nm2",
  "compute-s": "s",
  columns: "columns",
  rows: "rows",
} as const;

export type Unit = keyof typeof UNITS;

export interface Quantity {
  /** In words, without the symbol: "Magnetic field". */
  label: string;
  symbol?: string;
  unit: Unit;
  /** The CSV column name (the rule above). */
  column: string;
}

type Entry = [key: string, label: string, unit: Unit, words: string, symbol?: string];

/** Axis parameters (the engine's sweepable fields) and the inputs a result echoes. */
const PARAMETERS: Entry[] = [
  ["energyMeV", "Energy", "meV", "energy", "E"],
  ["fieldTesla", "Magnetic field", "T", "field", "B"],
  ["temperatureK", "Temperature", "K", "temperature", "T"],
  ["contactOhms", "Contact resistance", "Ω", "contact_resistance", "R_c"],
  ["node.forward", "Forward probability", "", "node_forward_probability", "P_f"],
  ["node.left", "Left-turn probability", "", "node_left_probability", "P_l"],
  ["node.right", "Right-turn probability", "", "node_right_probability", "P_r"],
  ["node.turning", "Turning probability", "", "node_turning_probability", "p"],
  ["node.phaseRad", "Node phase", "rad", "node_phase", "χ"],
  ["disorder.seed", "Disorder seed", "", "disorder_seed"],
  ["disorder.linkPhaseWidthRad", "Link-phase disorder width", "rad", "link_phase_disorder_width", "w"],
  ["disorder.forwardSpread", "Forward-probability spread", "", "forward_probability_spread", "δP_f"],
  ["periodNm", "Moiré period", "nm", "moire_period", "l"],
  ["twistDegrees", "Twist angle", "°", "twist_angle", "θ"],
  ["modeVelocityMps", "Mode velocity", "m/s", "mode_velocity", "v"],
  ["size.columns", "Sample length", "columns", "sample_length"],
  ["size.rows", "Sample width", "rows", "sample_width"],
];

/** Conductance figures (valleys and total) as the engine groups them. */
const conductanceFigures = (prefix: string, label: string, words: string): Entry[] => [
  [`${prefix}.total`, label, "e²/h", words, "G"],
  [`${prefix}.valleyK`, `${label}, valley K per spin`, "e²/h", `${words}_valley_k`],
  [`${prefix}.valleyKPrime`, `${label}, valley K′ per spin`, "e²/h", `${words}_valley_kprime`],
];

const hallFigures = (prefix: string, label: string, words: string): Entry[] => [
  [`${prefix}.longitudinalOhms`, `${label}longitudinal resistance`, "Ω", `${words}longitudinal_resistance`, "R_xx"],
  [`${prefix}.hallOhms`, `${label}Hall resistance`, "Ω", `${words}hall_resistance`, "R_xy"],
  [`${prefix}.twoTerminalOhms`, `${label}two-terminal resistance`, "Ω", `${words}two_terminal_resistance`],
];

const thermal: Entry[] = [
  ["thermal.energiesPerSample", "Thermal average: energies per sample", "", "thermal_energies_per_sample"],
  ["thermal.estimatedRelativeError", "Thermal average: estimated relative error", "", "thermal_estimated_relative_error"],
  ["thermal.relativeTolerance", "Thermal average: relative tolerance", "", "thermal_relative_tolerance"],
  ["thermal.narrowestResonanceMeV", "Narrowest resonance half-width", "meV", "narrowest_resonance_half_width"],
];

/** The scalar leaves of every engine result (src/engine/compute/*: ConductanceResult, DosResult, ...). */
const RESULTS: Entry[] = [
  ["fluxPerPlaquette", "Flux per plaquette", "h/e", "flux_per_plaquette", "Φ"],
  ["energyPeriodMeV", "Energy period 2πħv/l", "meV", "energy_period"],
  ["fieldPeriodTesla", "Field period h/(eA)", "T", "field_period"],
  ...conductanceFigures("conductance", "Conductance", "conductance"),
  ["siemens", "Conductance", "S", "conductance", "G"],
  ["ohms", "Resistance (1/G, with contacts)", "Ω", "resistance", "R"],
  ["channels.total", "Lead channels", "", "lead_channels"],
  ["channels.valleyK", "Lead channels, valley K", "", "lead_channels_valley_k"],
  ["channels.valleyKPrime", "Lead channels, valley K′", "", "lead_channels_valley_kprime"],
  ["fano", "Fano factor", "", "fano_factor", "F"],
  ["checks.currentConservationError", "Current conservation error |R + T − N|", "", "current_conservation_error"],
  ...thermal,
  ["ensemble.samples", "Ensemble size (disorder seeds)", "", "ensemble_samples"],
  ["ensemble.undetermined", "Seeds with undetermined resistances", "", "ensemble_undetermined_seeds"],
  ...conductanceFigures("ensemble.mean", "Ensemble mean conductance", "ensemble_mean_conductance"),
  ...conductanceFigures("ensemble.std", "Ensemble standard deviation of G", "ensemble_std_conductance"),
  ...conductanceFigures("ensemble.stderr", "Standard error of the ensemble mean G", "ensemble_stderr_conductance"),
  ...hallFigures("resistances", "", ""),
  ...hallFigures("ensemble.mean", "Ensemble mean ", "ensemble_mean_"),
  ...hallFigures("ensemble.std", "Ensemble standard deviation of the ", "ensemble_std_"),
  ...hallFigures("ensemble.stderr", "Standard error of the ensemble mean ", "ensemble_stderr_"),
  ["checks.rowSumError", "Conductance matrix: largest row sum", "e²/h", "row_sum_error"],
  ["checks.columnSumError", "Conductance matrix: largest column sum", "e²/h", "column_sum_error"],
  ["checks.unitarityError", "Unitarity error", "", "unitarity_error"],
  ["broadeningMeV", "Broadening", "meV", "broadening", "η"],
  ["carrierDensityFromMeV", "Carrier density counted from", "meV", "carrier_density_counted_from"],
  ["cellAreaNm2", "Moiré cell area", "nm²", "cell_area"],
  ["checks.statesPerCellPerPeriod", "States per cell per energy period", "", "states_per_cell_per_period"],
  ["totalDosPerMeV", "Density of states of the whole sample", "1/meV", "total_dos"],
  ["samples", "Ensemble size (disorder seeds)", "", "ensemble_samples"],
  ["rows", "Strip width", "rows", "strip_width"],
  ["widthNm", "Strip width", "nm", "strip_width", "W"],
  ["fitFromNm", "Fit from strip length", "nm", "fit_from_length"],
  ["localizationLength.valleyK.nm", "Localization length, valley K", "nm", "localization_length_valley_k", "ξ"],
  ["localizationLength.valleyK.inLinkLengths", "Localization length in link lengths, valley K", "", "localization_length_in_links_valley_k"],
  ["localizationLength.valleyK.stderrNm", "Standard error of ξ, valley K", "nm", "localization_length_stderr_valley_k"],
  ["localizationLength.valleyKPrime.nm", "Localization length, valley K′", "nm", "localization_length_valley_kprime", "ξ"],
  ["localizationLength.valleyKPrime.inLinkLengths", "Localization length in link lengths, valley K′", "", "localization_length_in_links_valley_kprime"],
  ["localizationLength.valleyKPrime.stderrNm", "Standard error of ξ, valley K′", "nm", "localization_length_stderr_valley_kprime"],
  ["lambda.valleyK", "Λ = ξ / W, valley K", "", "lambda_valley_k", "Λ"],
  ["lambda.valleyKPrime", "Λ = ξ / W, valley K′", "", "lambda_valley_kprime", "Λ"],
  ["flux.numerator", "Flux numerator p", "", "flux_numerator"],
  ["flux.denominator", "Flux denominator q", "", "flux_denominator"],
  ["bandsPerPrimitiveCell", "Bands per primitive cell", "", "bands_per_primitive_cell"],
  ["magneticCellPrimitiveCells", "Magnetic cell size", "", "magnetic_cell_primitive_cells"],
  ["checks.maxUnitarityDefect", "Largest unitarity defect of U(k)", "", "max_unitarity_defect"],
  ["computeSeconds", "Compute time", "compute-s", "compute"],
];

/** Inputs that are set once per calculation (the inputs block and the CSV header name them). */
const INPUTS: Entry[] = [
  ["lattice", "Lattice", "", "lattice"],
  ["transverse", "Transverse boundary", "", "transverse_boundary"],
  ["channelsPerLink", "Channels per link", "", "channels_per_link"],
  ["degeneracy.spin", "Spin degeneracy", "", "spin_degeneracy"],
  ["degeneracy.valley", "Valley degeneracy", "", "valley_degeneracy"],
  ["node.branch", "Node branch", "", "node_branch"],
  ["version", "Network format version", "", "network_format_version"],
  ["temperatureTolerance", "Thermal average tolerance (relative)", "", "thermal_tolerance"],
  ["temperatureMaxEnergies", "Thermal average: most energies per sample", "", "thermal_max_energies"],
  ["temperaturePoints", "Thermal average: fixed rule points", "", "thermal_points"],
  ["histogramBins", "Histogram bins", "", "histogram_bins"],
  ["pathPointsPerSegment", "k points per path segment", "", "path_points_per_segment"],
  ["source", "Source", "", "source"],
  ["kMesh", "k-mesh (points per direction)", "", "k_mesh"],
  ["energies.fromMeV", "Energies from", "meV", "energies_from"],
  ["energies.toMeV", "Energies to", "meV", "energies_to"],
  ["energies.points", "Energy points", "", "energy_points"],
  ["fitFromColumns", "Fit from strip length", "columns", "fit_from"],
  ["kPointsPerNm", "k points of the path", "1/nm", "k_points"],
  ["contacts", "Side contacts", "", "contacts"],
  ["measurements", "Four-terminal measurements", "", "measurements"],
];

/** Curves of a result (arrays), named for the figures' axes and their exports. */
const CURVES: Entry[] = [
  ["dosPerMeVPerCell.total", "Density of states per moiré cell", "1/(meV·cell)", "dos"],
  ["dosPerMeVPerNm2", "Density of states per area", "1/(meV·nm²)", "dos"],
  ["carrierDensityPerCm2", "Carrier density", "cm⁻²", "carrier_density", "n"],
  ["energiesMeV", "Energy", "meV", "energy", "E"],
  ["lengthsNm", "Strip length", "nm", "strip_length", "L"],
  ["meanLnT.valleyK", "Mean ln T, valley K", "", "mean_ln_t_valley_k"],
  ["stderrLnT.valleyK", "Standard error of ln T, valley K", "", "stderr_ln_t_valley_k"],
  ["meanLnT.valleyKPrime", "Mean ln T, valley K′", "", "mean_ln_t_valley_kprime"],
  ["stderrLnT.valleyKPrime", "Standard error of ln T, valley K′", "", "stderr_ln_t_valley_kprime"],
];

const toQuantity = ([, label, unit, words, symbol]: Entry): Quantity => ({ label, unit, symbol, column: `${words}_${UNITS[unit]}` });

const table = (entries: Entry[]) => Object.fromEntries(entries.map((e) => [e[0], toQuantity(e)])) as Record<string, Quantity>;

/** Every quantity by key; the parameters first (an echoed input is the axis it was swept as). */
export const QUANTITIES: Readonly<Record<string, Quantity>> = { ...table(INPUTS), ...table(RESULTS), ...table(CURVES), ...table(PARAMETERS) };

/** The parameters a scan axis may take, as the forms and the scan pages name them. */
export const PARAMETER_KEYS: readonly string[] = PARAMETERS.map((e) => e[0]);

/** camelCase / dotted -> words ("fieldPeriodTesla" -> "field period tesla"): only for a key this table does not know yet. */
function words(key: string): string {
  return key
    .replace(/\./g, " ")
    .replace(/([a-z0-9])([A-Z])/g, "$1 $2")
    .toLowerCase();
}

/** A quantity by key; a key the table does not know is put in words, never shown raw (and a unit test lists every key). */
export function quantity(key: string): Quantity {
  const known = QUANTITIES[key];
  if (known) return known;
  const w = words(key);
  return { label: w.charAt(0).toUpperCase() + w.slice(1), unit: "", column: `${w.replace(/[^a-z0-9]+/g, "_")}_1` };
}

/** "Magnetic field B (T)"; "Fano factor F" for a pure number. */
export function quantityText(key: string): string {
  const q = quantity(key);
  return q.unit ? `${named(q)} (${q.unit})` : named(q);
}

/** The label with its symbol: "Magnetic field B", "Localization length ξ, valley K" (a label that already shows it is kept). */
export function named(q: Quantity): string {
  if (!q.symbol || q.label.split(/[\s,=/]+/).includes(q.symbol)) return q.label;
  const comma = q.label.indexOf(", ");
  return comma < 0 ? `${q.label} ${q.symbol}` : `${q.label.slice(0, comma)} ${q.symbol}${q.label.slice(comma)}`;
}

/** "field (T)": a parameter in running text, e.g. a scan's title. */
export function quantityPhrase(key: string): string {
  const q = quantity(key);
  const label = /^[A-Z][a-z]/.test(q.label) ? q.label.charAt(0).toLowerCase() + q.label.slice(1) : q.label;
  return q.unit ? `${label} (${q.unit})` : label;
}

/** The quantity to show first on a scan: the ensemble mean if there is one, else the headline figure of the kind. */
export function preferredQuantity(names: string[]): string | null {
  for (const n of [
    "ensemble.mean.total",
    "conductance.total",
    "lambda.valleyK",
    "localizationLength.valleyK.nm",
    "ensemble.mean.longitudinalOhms",
    "resistances.longitudinalOhms",
    "totalDosPerMeV",
  ])
    if (names.includes(n)) return n;
  return names[0] ?? null;
}

/** The error-band partner of a quantity: ensemble.mean.X -> ensemble.stderr.X. */
export function errorQuantityFor(name: string, names: string[]): string | null {
  if (!name.startsWith("ensemble.mean.")) return null;
  const e = name.replace("ensemble.mean.", "ensemble.stderr.");
  return names.includes(e) ? e : null;
}

/** Keys written as engine field names (camelCase with their unit glued on), longest first, for putting messages in words. */
const FIELD_NAMES = Object.keys(QUANTITIES)
  .filter((k) => /[a-z][A-Z]/.test(k))
  .sort((a, b) => b.length - a.length);

/**
 * An engine or server message in words: a leading field path ("computation.fieldTesla: ...") becomes
 * the quantity's name, and field names inside the text ("fieldTesla must be ...") its words.
 */
export function messageInWords(message: string): string {
  const lead = /^(?:computation|network)\.([A-Za-z0-9.]+): /.exec(message);
  let text = lead ? `${quantityText(lead[1])}: ${message.slice(lead[0].length)}` : message;
  for (const key of FIELD_NAMES) {
    const q = QUANTITIES[key];
    const w = named(q);
    text = text.replace(new RegExp(`(?<![\\w.])${key.replace(/\./g, "\\.")}(?![\\w])`, "g"), w.charAt(0).toLowerCase() + w.slice(1));
  }
  return text;
}

/** A reason with its numbers masked: points that failed for the same reason at different values group together. */
export function reasonPattern(message: string): string {
  return message.replace(/-?\d+(?:\.\d+)?(?:e[-+]?\d+)?/gi, "#");
}

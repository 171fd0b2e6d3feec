/**
 * Network and computation schemas (zod), version 1: the one source of truth for the API, the UI,
 * the worker and the command line. Every field carries its unit in its name, has a default where
 * one is natural, and bounds. Unknown fields are errors.
 */
import { z } from "zod";
import { EngineInputError, type EngineIssue } from "./errors";
import { GRAPHENE_LATTICE_NM, periodFromTwistNm } from "./constants";
import { checkTriangularNode, checkExplicitNodeMatrix, reachableForwardRange } from "./network/node-matrices";
import { checkHallBar } from "./compute/hall-bar-check";
import { checkTorusField, runsOnClosedSample } from "./network/torus";

export const MAX_COLUMNS = 2000;
export const MAX_ROWS = 2000;

const finite = (label: string) => z.number({ error: `${label} must be a finite number` }).refine(Number.isFinite, `${label} must be a finite number`);

export const sizeSchema = z.strictObject({
  columns: z.int().min(1).max(MAX_COLUMNS).describe("number of node columns along the transport direction x"),
  rows: z.int().min(1).max(MAX_ROWS).describe("number of node rows across the sample (y)"),
});

export const degeneracySchema = z.strictObject({
  spin: z.union([z.literal(1), z.literal(2)]).optional(),
  valley: z.union([z.literal(1), z.literal(2)]).optional(),
});

export const complexSchema = z.tuple([finite("real part"), finite("imaginary part")]);

export const triangularProbabilityNodeSchema = z.strictObject({
  forward: z.number().min(0).max(1).describe("probability to go straight on"),
  left: z.number().min(0).max(1).optional().describe("probability to turn left (+120 degrees); default: half of 1 - forward, or 1 - forward - right"),
  right: z.number().min(0).max(1).optional().describe("probability to turn right (-120 degrees)"),
  branch: z
    .union([z.literal(1), z.literal(-1)])
    .default(1)
    .describe("which of the two mirror unitary solutions with the same probabilities (the model manual, /manual#node)"),
  phaseRad: z.number().min(-100).max(100).default(0).describe("overall node phase chi (an energy offset)"),
});

export const triangularMatrixNodeSchema = z.strictObject({
  matrix: z.array(z.array(complexSchema).min(3).max(6)).min(3).max(6).describe("explicit unitary node matrix S[m][j], entries [re, im]"),
});

export const squareNodeSchema = z.strictObject({
  turning: z.number().min(0).max(1).describe("probability to turn right (towards the clockwise plaquette) at a node"),
});

export const disorderSchema = z.strictObject({
  linkPhaseWidthRad: z
    .number()
    .min(0)
    .max(2 * Math.PI)
    .default(0)
    .describe("width w of the uniform random link phase in [-w/2, w/2]"),
  forwardSpread: z.number().min(0).max(1).default(0).describe("width of the uniform spread of the node forward (square: turning) probability"),
  seed: z.int().min(0).max(4294967295).default(1).describe("seed of the disorder generator"),
});

const baseNetworkSchema = z.strictObject({
  version: z.literal(1).default(1),
  lattice: z.enum(["triangular", "square"]),
  size: sizeSchema,
  transverse: z.enum(["periodic", "open"]).default("periodic"),
  periodNm: z.number().min(1).max(100000).optional().describe("link length l (moire period) in nm"),
  twistDegrees: z.number().min(0.01).max(5).optional().describe(`twist angle; l = a / (2 sin(theta/2)), a = ${GRAPHENE_LATTICE_NM} nm`),
  modeVelocityMps: z.number().min(1e3).max(1e7).default(1e6).describe("velocity of the link modes in m/s"),
  channelsPerLink: z.union([z.literal(1), z.literal(2)]).default(1),
  degeneracy: degeneracySchema.optional(),
  node: z.union([triangularProbabilityNodeSchema, triangularMatrixNodeSchema, squareNodeSchema]),
  disorder: disorderSchema.optional(),
});

type BaseNetwork = z.output<typeof baseNetworkSchema>;

export type TriangularProbabilityNode = { forward: number; left: number; right: number; branch: 1 | -1; phaseRad: number };
export type MatrixNode = { matrix: [number, number][][] };
export type SquareNode = { turning: number };

export interface Network {
  version: 1;
  lattice: "triangular" | "square";
  size: { columns: number; rows: number };
  transverse: "periodic" | "open";
  periodNm?: number;
  twistDegrees?: number;
  modeVelocityMps: number;
  channelsPerLink: 1 | 2;
  degeneracy: { spin: 1 | 2; valley: 1 | 2 };
  node: TriangularProbabilityNode | MatrixNode | SquareNode;
  disorder: { linkPhaseWidthRad: number; forwardSpread: number; seed: number };
}

function finishNetwork(n: BaseNetwork, ctx: z.RefinementCtx): Network {
  const issue = (path: (string | number)[], message: string) => ctx.addIssue({ code: "custom", path, message });
  if (n.periodNm === undefined && n.twistDegrees === undefined)
    issue(["periodNm"], "give the scale: periodNm (1 to 100000 nm) or twistDegrees (0.01 to 5 degrees)");
  if (n.periodNm !== undefined && n.twistDegrees !== undefined) issue(["twistDegrees"], "give either periodNm or twistDegrees, not both");
  const isTri = n.lattice === "triangular";
  const defaults = isTri ? { spin: 2 as const, valley: 2 as const } : { spin: 1 as const, valley: 1 as const };
  const degeneracy = { spin: n.degeneracy?.spin ?? defaults.spin, valley: n.degeneracy?.valley ?? defaults.valley };
  const disorder = { linkPhaseWidthRad: 0, forwardSpread: 0, seed: 1, ...(n.disorder ?? {}) };
  let node: Network["node"] = n.node as Network["node"];
  const rawNode = n.node as Record<string, unknown>;
  if (isTri) {
    if ("turning" in rawNode) issue(["node"], "a triangular node takes { forward, left, right, branch, phaseRad } or { matrix }, not turning");
    else if ("matrix" in rawNode) {
      const dim = 3 * n.channelsPerLink;
      const problem = checkExplicitNodeMatrix((rawNode as MatrixNode).matrix, dim);
      if (problem) issue(["node", "matrix"], problem);
      if (disorder.forwardSpread > 0)
        issue(["disorder", "forwardSpread"], "forwardSpread needs a probability node ({ forward, left, right }); with an explicit matrix it must be 0");
    } else {
      const p = rawNode as { forward: number; left?: number; right?: number; branch: 1 | -1; phaseRad: number };
      let left = p.left,
        right = p.right;
      if (left === undefined && right === undefined) {
        left = (1 - p.forward) / 2;
        right = left;
      } else if (left === undefined) left = 1 - p.forward - (right as number);
      else if (right === undefined) right = 1 - p.forward - left;
      const sum = p.forward + (left as number) + (right as number);
      if (Math.abs(sum - 1) > 1e-9 || (left as number) < -1e-12 || (right as number) < -1e-12) {
        issue(
          ["node", "forward"],
          `forward + left + right must equal 1 (got ${sum.toPrecision(12)} ` +
            `with left ${(left as number).toPrecision(6)}, right ${(right as number).toPrecision(6)}); each lies in [0, 1]`,
        );
      } else {
        left = Math.max(0, left as number);
        right = Math.max(0, right as number);
        const problem = checkTriangularNode(p.forward, left, right);
        if (problem) issue(["node", "forward"], problem);
        else if (disorder.forwardSpread > 0) {
          const range = reachableForwardRange(left, right, p.forward);
          const lo = p.forward - disorder.forwardSpread / 2,
            hi = p.forward + disorder.forwardSpread / 2;
          if (lo < range.min - 1e-12 || hi > range.max + 1e-12) {
            issue(
              ["disorder", "forwardSpread"],
              `forward +- forwardSpread/2 = [${lo.toFixed(6)}, ${hi.toFixed(6)}] ` +
                `leaves the reachable range [${range.min.toFixed(6)}, ${range.max.toFixed(6)}] ` +
                `for this left:right ratio; ` +
                `allowed forwardSpread <= ${(2 * Math.min(p.forward - range.min, range.max - p.forward)).toFixed(6)}`,
            );
          }
        }
        node = { forward: p.forward, left, right, branch: p.branch, phaseRad: p.phaseRad };
      }
    }
  } else {
    if (!("turning" in rawNode)) issue(["node"], "a square node takes { turning } (probability 0 to 1)");
    else {
      const p = (rawNode as SquareNode).turning;
      const lo = p - disorder.forwardSpread / 2,
        hi = p + disorder.forwardSpread / 2;
      if (lo < -1e-12 || hi > 1 + 1e-12)
        issue(
          ["disorder", "forwardSpread"],
          `turning +- forwardSpread/2 = [${lo}, ${hi}] must stay within [0, 1]; allowed forwardSpread <= ${2 * Math.min(p, 1 - p)}`,
        );
    }
    if (n.channelsPerLink !== 1) issue(["channelsPerLink"], "the square network has one channel per link (channelsPerLink 1)");
  }
  if (n.transverse === "periodic" && isTri && n.size.rows % 2 !== 0)
    issue(["size", "rows"], `a periodic (cylinder) triangular sample needs an even number of rows (got ${n.size.rows}); allowed: 2, 4, 6, ...`);
  const out: Network = {
    version: 1,
    lattice: n.lattice,
    size: n.size,
    transverse: n.transverse,
    modeVelocityMps: n.modeVelocityMps,
    channelsPerLink: n.channelsPerLink,
    degeneracy,
    node,
    disorder,
  };
  if (n.periodNm !== undefined) out.periodNm = n.periodNm;
  if (n.twistDegrees !== undefined) out.twistDegrees = n.twistDegrees;
  return out;
}

export const networkSchema = baseNetworkSchema.transform((n, ctx) => finishNetwork(n, ctx));
/** A network description as written (before defaults are filled in and the node is checked). */
export type NetworkDefinition = z.input<typeof networkSchema>;

const ensembleSchema = z.strictObject({ samples: z.int().min(1).max(100000) });
const fluxSchema = z.strictObject({
  numerator: z.int().min(-1000).max(1000),
  denominator: z.int().min(1).max(64),
});
const energyGridSchema = z.strictObject({
  fromMeV: z.number().min(-1e5).max(1e5),
  toMeV: z.number().min(-1e5).max(1e5),
  points: z.int().min(1).max(20000),
});

export const conductanceComputationSchema = z.strictObject({
  kind: z.literal("conductance"),
  energyMeV: z.number().min(-1e5).max(1e5).default(0),
  fieldTesla: z.number().min(-1000).max(1000).default(0),
  temperatureK: z.number().min(0).max(1000).default(0),
  temperaturePoints: z
    .int()
    .min(2)
    .max(400)
    .optional()
    .describe("a fixed Gauss-Legendre rule of this many points for the thermal average, its error estimated against half as many (default: the adaptive rule)"),
  temperatureTolerance: z.number().min(1e-8).max(0.1).default(1e-4).describe("relative accuracy of the adaptive thermal average"),
  temperatureMaxEnergies: z.int().min(120).max(100000).default(20000).describe("most energies per sample the adaptive thermal average may use"),
  contactOhms: z.number().min(0).max(1e9).default(0),
  ensemble: ensembleSchema.optional(),
  histogramBins: z.int().min(1).max(1000).default(20),
});

export const spectrumComputationSchema = z.strictObject({
  kind: z.literal("spectrum"),
  flux: fluxSchema.default({ numerator: 0, denominator: 1 }).describe("flux quanta h/e per elementary plaquette (triangle or square)"),
  kPointsPerNm: z
    .array(z.tuple([finite("kx"), finite("ky")]))
    .min(1)
    .max(20000)
    .optional(),
  pathPointsPerSegment: z.int().min(1).max(2000).default(24),
});

export const dosComputationSchema = z.strictObject({
  kind: z.literal("dos"),
  source: z.enum(["bloch", "sample"]).default("bloch"),
  energies: energyGridSchema.optional().describe("default: one energy period from 0 in 200 points"),
  broadeningMeV: z.number().min(1e-6).max(1e5).optional().describe("Lorentzian (periodic Poisson kernel) width; default period / 100"),
  flux: fluxSchema.default({ numerator: 0, denominator: 1 }).describe("bloch source: flux per plaquette"),
  fieldTesla: z.number().min(-1000).max(1000).default(0).describe("sample source: magnetic field"),
  kMesh: z.int().min(1).max(1024).default(48).describe("bloch source: k points per reciprocal direction"),
});

export const ldosComputationSchema = z.strictObject({
  kind: z.literal("ldos"),
  energyMeV: z.number().min(-1e5).max(1e5).default(0),
  fieldTesla: z.number().min(-1000).max(1000).default(0),
  broadeningMeV: z.number().min(1e-6).max(1e5).optional(),
});

export const localizationComputationSchema = z.strictObject({
  kind: z.literal("localization"),
  energyMeV: z.number().min(-1e5).max(1e5).default(0),
  fieldTesla: z.number().min(-1000).max(1000).default(0),
  ensemble: ensembleSchema.default({ samples: 4 }),
  fitFromColumns: z
    .int()
    .min(1)
    .max(MAX_COLUMNS)
    .optional()
    .describe("first strip length (in columns) used in the fit of ln T; default max(rows, columns / 4)"),
});

const terminalName = z
  .string()
  .min(1)
  .max(40)
  .regex(/^[A-Za-z0-9_-]+$/, "letters, digits, '_' and '-' only");
export const hallBarComputationSchema = z.strictObject({
  kind: z.literal("hallBar"),
  energyMeV: z.number().min(-1e5).max(1e5).default(0),
  fieldTesla: z.number().min(-1000).max(1000).default(0),
  temperatureK: z.number().min(0).max(1000).default(0),
  temperaturePoints: z.int().min(2).max(400).optional().describe("a fixed Gauss-Legendre rule of this many points for the thermal average"),
  temperatureTolerance: z.number().min(1e-8).max(0.1).default(1e-4).describe("relative accuracy of the adaptive thermal average"),
  temperatureMaxEnergies: z.int().min(120).max(100000).default(20000).describe("most energies per sample the adaptive thermal average may use"),
  contactOhms: z.number().min(0).max(1e9).default(0).describe("series contact resistance of the current path, added to the two-terminal resistance"),
  contacts: z
    .array(
      z.strictObject({
        name: terminalName,
        edge: z.enum(["top", "bottom"]),
        fromColumn: z.int().min(0).max(MAX_COLUMNS),
        toColumn: z.int().min(0).max(MAX_COLUMNS),
      }),
    )
    .max(32)
    .optional()
    .describe(
      "side contacts on the open edges; default the six-terminal bar (top1, bottom1 at floor(C/3), top2, bottom2 at floor(2C/3)); [] leaves the two leads",
    ),
  measurements: z
    .array(z.strictObject({ current: z.tuple([terminalName, terminalName]), voltage: z.tuple([terminalName, terminalName]) }))
    .max(64)
    .default([])
    .describe("four-terminal resistances R = (V_voltage0 - V_voltage1) / I for a current from current0 to current1"),
  ensemble: ensembleSchema.optional(),
});

export const computationSchema = z.discriminatedUnion("kind", [
  conductanceComputationSchema,
  spectrumComputationSchema,
  dosComputationSchema,
  ldosComputationSchema,
  localizationComputationSchema,
  hallBarComputationSchema,
]);

export const computeInputSchema = z.strictObject({ network: networkSchema, computation: computationSchema });

export type Computation = z.output<typeof computationSchema>;
export type ConductanceComputation = z.output<typeof conductanceComputationSchema>;
export type SpectrumComputation = z.output<typeof spectrumComputationSchema>;
export type DosComputation = z.output<typeof dosComputationSchema>;
export type LdosComputation = z.output<typeof ldosComputationSchema>;
export type LocalizationComputation = z.output<typeof localizationComputationSchema>;
export type HallBarComputation = z.output<typeof hallBarComputationSchema>;
export interface ComputeInput {
  network: Network;
  computation: Computation;
}

function describeIssue(issue: z.core.$ZodIssue, root: string): EngineIssue {
  const i0 = issue as { keys?: string[] };
  const extra = issue.code === "unrecognized_keys" && i0.keys && i0.keys.length > 0 ? [i0.keys[0]] : [];
  const field = [root, ...issue.path.map(String), ...extra].filter((s) => s !== "").join(".");
  const i = issue as z.core.$ZodIssue & {
    minimum?: number | bigint;
    maximum?: number | bigint;
    inclusive?: boolean;
    keys?: string[];
    values?: unknown[];
    expected?: string;
  };
  let message = issue.message;
  switch (issue.code) {
    case "too_small":
      message = `must be ${i.inclusive === false ? ">" : ">="} ${String(i.minimum)} (${issue.message})`;
      break;
    case "too_big":
      message = `must be ${i.inclusive === false ? "<" : "<="} ${String(i.maximum)} (${issue.message})`;
      break;
    case "unrecognized_keys":
      message = `unknown field(s) ${(i.keys ?? []).map((k) => JSON.stringify(k)).join(", ")}; unknown fields are not allowed`;
      break;
    case "invalid_value":
      message = `must be one of ${(i.values ?? []).map((v) => JSON.stringify(v)).join(", ")}`;
      break;
    case "invalid_type":
      message = `${issue.message}`;
      break;
    default:
      break;
  }
  return { field, message };
}

/** Pick the node branch the user meant (by its keys) so that a union failure gives a precise message. */
function refineNodeIssues(raw: unknown, issues: EngineIssue[]): EngineIssue[] {
  const network = (raw as { network?: { node?: unknown } } | null)?.network;
  const node = network?.node;
  return issues.flatMap((iss) => {
    if (iss.field !== "network.node" || typeof node !== "object" || node === null) return [iss];
    const keys = Object.keys(node);
    const schema = keys.includes("matrix") ? triangularMatrixNodeSchema : keys.includes("turning") ? squareNodeSchema : triangularProbabilityNodeSchema;
    const r = schema.safeParse(node);
    if (r.success) return [iss];
    return r.error.issues.map((x) => describeIssue(x, "network.node"));
  });
}

/** Parse and validate a { network, computation } document; throws EngineInputError. */
export function parseComputeInput(json: unknown): ComputeInput {
  const r = computeInputSchema.safeParse(json);
  if (r.success) {
    const input = r.data as ComputeInput;
    // checks that need the network; the contacts in force (the default bar when none are given) are filled in
    if (input.computation.kind === "hallBar") input.computation.contacts = checkHallBar(input.network, input.computation);
    // a closed periodic sample holds a whole number of flux quanta (network/torus.ts): refused here, before any work
    if (runsOnClosedSample(input.computation)) {
      const problem = checkTorusField(input.network, (input.computation as { fieldTesla: number }).fieldTesla);
      if (problem) throw new EngineInputError("computation.fieldTesla", problem);
    }
    return input;
  }
  let issues = r.error.issues.map((x) => describeIssue(x, ""));
  issues = refineNodeIssues(json, issues);
  const first = issues[0];
  throw new EngineInputError(first.field || "input", first.message, issues);
}

/** Parse a network alone; throws EngineInputError with fields under "network.". */
export function parseNetwork(json: unknown): Network {
  const r = networkSchema.safeParse(json);
  if (r.success) return r.data;
  let issues = r.error.issues.map((x) => describeIssue(x, "network"));
  issues = refineNodeIssues({ network: json }, issues);
  throw new EngineInputError(issues[0].field, issues[0].message, issues);
}

/** Link length l (moire period) in nm. */
export function linkLengthNm(network: Network): number {
  if (network.periodNm !== undefined) return network.periodNm;
  return periodFromTwistNm(network.twistDegrees as number);
}

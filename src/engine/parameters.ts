/** Sweeps and fits: change one parameter of a parsed input and re-validate. */
import { EngineInputError } from "./errors";
import { reachableIntervals } from "./network/node-matrices";
import { parseComputeInput, type ComputeInput, type Network } from "./schema";

export interface SweepableParameter {
  name: string;
  unit: string;
  description: string;
  bounds: { min: number; max: number };
  /** Where it lives: a computation field (for the kinds listed) or a network field. */
  appliesTo: "computation" | "network";
  kinds?: string[];
}

export const SWEEPABLE_PARAMETERS: readonly SweepableParameter[] = [
  {
    name: "energyMeV",
    unit: "meV",
    description: "Fermi energy",
    bounds: { min: -1e5, max: 1e5 },
    appliesTo: "computation",
    kinds: ["conductance", "ldos", "localization", "hallBar"],
  },
  {
    name: "fieldTesla",
    unit: "T",
    description: "perpendicular magnetic field",
    bounds: { min: -1000, max: 1000 },
    appliesTo: "computation",
    kinds: ["conductance", "ldos", "localization", "dos", "hallBar"],
  },
  {
    name: "temperatureK",
    unit: "K",
    description: "temperature of the thermal average",
    bounds: { min: 0, max: 1000 },
    appliesTo: "computation",
    kinds: ["conductance", "hallBar"],
  },
  {
    name: "contactOhms",
    unit: "ohm",
    description: "series contact resistance",
    bounds: { min: 0, max: 1e9 },
    appliesTo: "computation",
    kinds: ["conductance", "hallBar"],
  },
  { name: "periodNm", unit: "nm", description: "link length (moire period)", bounds: { min: 1, max: 100000 }, appliesTo: "network" },
  { name: "twistDegrees", unit: "degree", description: "twist angle (sets the period)", bounds: { min: 0.01, max: 5 }, appliesTo: "network" },
  { name: "modeVelocityMps", unit: "m/s", description: "velocity of the link modes", bounds: { min: 1e3, max: 1e7 }, appliesTo: "network" },
  {
    name: "node.forward",
    unit: "1",
    description: "forward probability (left and right rescaled, ratio kept)",
    bounds: { min: 0, max: 1 },
    appliesTo: "network",
  },
  {
    name: "node.left",
    unit: "1",
    description: "left-turn probability (forward kept, right = 1 - forward - left)",
    bounds: { min: 0, max: 1 },
    appliesTo: "network",
  },
  {
    name: "node.right",
    unit: "1",
    description: "right-turn probability (forward kept, left = 1 - forward - right)",
    bounds: { min: 0, max: 1 },
    appliesTo: "network",
  },
  { name: "node.phaseRad", unit: "rad", description: "overall node phase", bounds: { min: -100, max: 100 }, appliesTo: "network" },
  { name: "node.turning", unit: "1", description: "square network: probability to turn right", bounds: { min: 0, max: 1 }, appliesTo: "network" },
  {
    name: "disorder.linkPhaseWidthRad",
    unit: "rad",
    description: "width of the random link phases",
    bounds: { min: 0, max: 2 * Math.PI },
    appliesTo: "network",
  },
  { name: "disorder.forwardSpread", unit: "1", description: "spread of the node forward probability", bounds: { min: 0, max: 1 }, appliesTo: "network" },
  { name: "disorder.seed", unit: "1", description: "disorder seed (rounded to an integer)", bounds: { min: 0, max: 4294967295 }, appliesTo: "network" },
  { name: "size.columns", unit: "1", description: "sample length in columns (rounded)", bounds: { min: 1, max: 2000 }, appliesTo: "network" },
  { name: "size.rows", unit: "1", description: "sample width in rows (rounded)", bounds: { min: 1, max: 2000 }, appliesTo: "network" },
];

const NAMES = SWEEPABLE_PARAMETERS.map((p) => p.name);

/** A copy of `input` with one parameter changed; re-validated (EngineInputError if out of range). */
export function applyParameter(input: ComputeInput, parameter: string, value: number): ComputeInput {
  const spec = SWEEPABLE_PARAMETERS.find((p) => p.name === parameter);
  if (!spec) throw new EngineInputError("parameter", `unknown parameter ${JSON.stringify(parameter)}; allowed: ${NAMES.join(", ")}`);
  if (!Number.isFinite(value)) throw new EngineInputError(parameter, `value must be a finite number, got ${value}`);
  const raw = JSON.parse(JSON.stringify(input)) as {
    network: Record<string, unknown> & { node: Record<string, number>; disorder: Record<string, number>; size: Record<string, number> };
    computation: Record<string, unknown>;
  };
  const net = raw.network;
  if (spec.appliesTo === "computation") {
    const kind = String(raw.computation.kind);
    if (spec.kinds && !spec.kinds.includes(kind))
      throw new EngineInputError(`computation.${parameter}`, `${parameter} does not apply to a ${kind} computation; it applies to ${spec.kinds.join(", ")}`);
    raw.computation[parameter] = value;
  } else if (parameter === "periodNm") {
    delete net.twistDegrees;
    net.periodNm = value;
  } else if (parameter === "twistDegrees") {
    delete net.periodNm;
    net.twistDegrees = value;
  } else if (parameter === "modeVelocityMps") net.modeVelocityMps = value;
  else if (parameter.startsWith("node.")) {
    const key = parameter.slice(5);
    const node = net.node;
    if (key === "turning") {
      if (!("turning" in node)) throw new EngineInputError("network.node.turning", "node.turning applies to the square lattice only");
      node.turning = value;
    } else {
      if (!("forward" in node))
        throw new EngineInputError(
          `network.node.${key}`,
          `node.${key} needs a probability node ({ forward, left, right }); this network has ${"matrix" in node ? "an explicit matrix" : "a square node"}`,
        );
      if (key === "forward" || key === "left" || key === "right") Object.assign(node, nodeWithParameter(node as NodeProbabilities, key, value));
      else if (key === "phaseRad") node.phaseRad = value;
    }
  } else if (parameter.startsWith("disorder.")) {
    const key = parameter.slice(9);
    net.disorder[key] = key === "seed" ? Math.round(value) : value;
  } else if (parameter.startsWith("size.")) {
    net.size[parameter.slice(5)] = Math.round(value);
  }
  return parseComputeInput(raw);
}

type NodeProbabilities = { forward: number; left: number; right: number };
/** The node probabilities a scan over it can change: forward (left:right kept), left or right (forward kept). */
export type NodeProbabilityParameter = "node.forward" | "node.left" | "node.right";

/**
 * The node a scan point sets: forward rescales left and right in their ratio (equal when both are
 * 0); left or right keeps forward and gives the rest to the other turn.
 */
export function nodeWithParameter(node: NodeProbabilities, key: "forward" | "left" | "right", value: number): NodeProbabilities {
  if (key === "forward") {
    const turn = node.left + node.right;
    const t = turn > 0 ? node.left / turn : 0.5;
    return { forward: value, left: (1 - value) * t, right: (1 - value) * (1 - t) };
  }
  if (key === "left") return { forward: node.forward, left: value, right: 1 - node.forward - value };
  return { forward: node.forward, left: 1 - node.forward - value, right: value };
}

/**
 * The values of a node probability (node.forward, node.left, node.right on a triangular
 * probability node; node.turning on a square node) that the engine accepts on this network when a
 * scan sets it as applyParameter does, as disjoint intervals in increasing order (every value
 * inside one is accepted; a turn on a node with forward < 1/9 has two). It is the node rule of the
 * schema (the triangle of the circulant amplitudes, network/node-matrices.ts) and, for
 * node.forward and node.turning, the disorder rule that the value +- forwardSpread / 2 stays
 * reachable. Left out: forward = 1 with left != right (an isolated reachable point). null when the
 * parameter is not such a probability of this network's node, and for node.left and node.right on
 * a node with a forward spread (each value is then checked by parsing it).
 */
export function reachableParameterRanges(network: Network, parameter: string): { min: number; max: number }[] | null {
  const node = network.node as Partial<NodeProbabilities> & { turning?: number; matrix?: unknown };
  const spread = network.disorder.forwardSpread;
  if (parameter === "node.turning") return "turning" in node ? (spread <= 1 ? [{ min: spread / 2, max: 1 - spread / 2 }] : []) : null;
  if (parameter !== "node.forward" && parameter !== "node.left" && parameter !== "node.right") return null;
  if (node.forward === undefined || node.left === undefined || node.right === undefined) return null;
  const base = node as NodeProbabilities;
  const key = parameter.slice(5) as "forward" | "left" | "right";
  if (key !== "forward" && spread > 0) return null;
  const family = (x: number): [number, number, number] => {
    const n = nodeWithParameter(base, key, x);
    return [n.forward, n.left, n.right];
  };
  // forward runs over [0, 1]; a turn over [0, 1 - forward] (the other turn takes the rest)
  const ranges = reachableIntervals(family, 0, key === "forward" ? 1 : 1 - base.forward);
  if (spread === 0) return ranges;
  return ranges.map((r) => ({ min: r.min + spread / 2, max: r.max - spread / 2 })).filter((r) => r.min <= r.max);
}

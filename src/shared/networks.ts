/**
 * Network descriptions (engine schema v1) built from the few numbers that set one apart: the
 * size, the node and, where wanted, an open edge or disorder. Every other field takes the value
 * the ready-made networks of Triskel share (the editor's starting points, the demo lab's saved
 * networks, the synthetic dataset's network). Fields come out in the order the editor and the
 * JSON views show them.
 */
import type { NetworkDefinition } from "@/engine/browser";

export interface NetworkSize {
  columns: number;
  rows: number;
}

export interface NetworkDisorder {
  linkPhaseWidthRad?: number;
  forwardSpread?: number;
  seed?: number;
}

interface Extras {
  transverse?: "periodic" | "open";
  disorder?: NetworkDisorder;
}

/** A triangular network at a 0.11° twist with 10⁶ m/s modes, spin and valley counted twice. */
export function triangularNetwork(
  size: NetworkSize,
  node: { forward: number; left: number; right: number },
  { transverse = "periodic", disorder }: Extras = {},
): NetworkDefinition {
  return {
    lattice: "triangular",
    size,
    transverse,
    twistDegrees: 0.11,
    modeVelocityMps: 1.0e6,
    channelsPerLink: 1,
    degeneracy: { spin: 2, valley: 2 },
    node: { ...node, branch: 1, phaseRad: 0 },
    ...(disorder ? { disorder } : {}),
  };
}

/** A square network with 100 nm links and 10⁶ m/s modes, one spin and one valley. */
export function squareNetwork(size: NetworkSize, turning: number, { transverse = "periodic", disorder }: Extras = {}): NetworkDefinition {
  return {
    lattice: "square",
    size,
    transverse,
    periodNm: 100,
    modeVelocityMps: 1.0e6,
    channelsPerLink: 1,
    degeneracy: { spin: 1, valley: 1 },
    node: { turning },
    ...(disorder ? { disorder } : {}),
  };
}

/**
 * The example network every new group starts with (personal or a lab's): invented, in the style of
 * the demo lab's networks, small enough for the Free plan, and marked as an example in its name
 * (the first-steps card and the network list recognise it by this name).
 */
export const EXAMPLE_NETWORK: { name: string; definition: NetworkDefinition } = {
  name: "Example: clean 0.11° triangular network, 12 × 8 (invented starting point)",
  definition: triangularNetwork({ columns: 12, rows: 8 }, { forward: 0.6, left: 0.2, right: 0.2 }),
};

export const isExampleNetwork = (name: string) => name === EXAMPLE_NETWORK.name;

/**
 * Node probabilities (forward, left, right) of a three-fold symmetric triangular-network node.
 *
 * A triple summing to 1 is reachable by a unitary node iff the three lengths
 * sqrt(f r), sqrt(l f), sqrt(r l) can close a triangle (physics.md section 2): each is at most
 * the sum of the other two. With left = right this is forward >= 1/9.
 *
 * This module is pure: it serves the ternary diagram and the inline messages of the network
 * form, with the engine's own rule (isReachableNode, reachableForwardRange from @/engine/browser).
 */
import { isReachableNode, reachableForwardRange } from "@/engine/browser";

export interface Triple {
  forward: number;
  left: number;
  right: number;
}

export const SUM_TOLERANCE = 1e-6;

export type TripleVerdict =
  | { ok: true }
  | {
      ok: false;
      reason: "range" | "sum" | "triangle";
      /** Field to point the message at. */
      field: keyof Triple;
      message: string;
      /** Allowed forward interval with left : right kept in the same ratio (null if none). */
      forwardRange: [number, number] | null;
      /** The nearest reachable triple along that line, for a one-click fix. */
      suggestion: Triple | null;
    };

const fmt = (x: number, d = 3) => (Math.abs(x) < 1e-12 ? "0" : x.toFixed(d));

/** Triangle inequality on sqrt(fr), sqrt(lf), sqrt(rl); returns the worst violation (<= 0 means reachable), for the message's numbers. */
export function triangleExcess({ forward: f, left: l, right: r }: Triple): { excess: number; longest: 0 | 1 | 2; sides: [number, number, number] } {
  const sides: [number, number, number] = [Math.sqrt(f * r), Math.sqrt(l * f), Math.sqrt(r * l)];
  let longest: 0 | 1 | 2 = 0;
  if (sides[1] > sides[longest]) longest = 1;
  if (sides[2] > sides[longest]) longest = 2;
  const others = sides.reduce((a, b) => a + b, 0) - sides[longest];
  return { excess: sides[longest] - others, longest, sides };
}

/** A probability triple summing to 1 that the engine's own node rule accepts (isReachableNode). */
export function isReachable(t: Triple): boolean {
  const { forward, left, right } = t;
  if ([forward, left, right].some((x) => !Number.isFinite(x) || x < 0 || x > 1)) return false;
  if (Math.abs(forward + left + right - 1) > SUM_TOLERANCE) return false;
  return isReachableNode(forward, left, right);
}

/** Triple at a given forward value with left : right in the ratio share : (1 - share). */
export function onRay(forward: number, share: number): Triple {
  return { forward, left: (1 - forward) * share, right: (1 - forward) * (1 - share) };
}

/**
 * The allowed interval of forward with left : right held at `share` : 1 - share: the engine's
 * reachableForwardRange. Null when no forward value below 1 works (for example left = 0 < right).
 */
export function forwardRangeForShare(share: number): [number, number] | null {
  const { min, max } = reachableForwardRange(share, 1 - share, 1);
  return min === max ? null : [min, max];
}

/** Checks a triple and explains a refusal in words that say what to change. */
export function checkTriple(t: Triple): TripleVerdict {
  const names: (keyof Triple)[] = ["forward", "left", "right"];
  for (const k of names) {
    const x = t[k];
    if (!Number.isFinite(x) || x < 0 || x > 1) {
      return {
        ok: false,
        reason: "range",
        field: k,
        message: `${k} must be a probability between 0 and 1 (got ${Number.isFinite(x) ? x : "no number"}).`,
        forwardRange: null,
        suggestion: null,
      };
    }
  }
  const sum = t.forward + t.left + t.right;
  if (Math.abs(sum - 1) > SUM_TOLERANCE) {
    const turn = t.left + t.right;
    const suggestion = turn > 0 ? { forward: t.forward, left: (t.left / turn) * (1 - t.forward), right: (t.right / turn) * (1 - t.forward) } : null;
    return {
      ok: false,
      reason: "sum",
      field: "forward",
      message: `forward + left + right must equal 1 (current probability is conserved at the node); they add up to ${fmt(sum, 4)}.`,
      forwardRange: null,
      suggestion: suggestion && isReachable(suggestion) ? suggestion : null,
    };
  }
  if (isReachableNode(t.forward, t.left, t.right)) return { ok: true };
  const { longest, sides } = triangleExcess(t);
  const labels = ["√(forward·right)", "√(left·forward)", "√(right·left)"];
  const others = [0, 1, 2].filter((i) => i !== longest);
  const turn = t.left + t.right;
  const share = turn > 0 ? t.left / turn : 0.5;
  const range = forwardRangeForShare(share);
  let suggestion: Triple | null = null;
  if (range) {
    const f = t.forward < range[0] ? range[0] : range[1];
    // Step a hair inside the region so rounding keeps the suggestion reachable.
    const fNudged = t.forward < range[0] ? Math.min(range[1], Math.ceil(f * 1000) / 1000) : Math.max(range[0], Math.floor(f * 1000) / 1000);
    suggestion = onRay(fNudged, share);
    if (!isReachable(suggestion)) suggestion = onRay(f, share);
  }
  const rangeText = range
    ? `With left : right kept at ${fmt(share, 2)} : ${fmt(1 - share, 2)}, forward must lie between ${fmt(range[0])} and ${fmt(range[1])}.`
    : "No forward value works with this split of left and right; give both turns some probability.";
  const equalHint = Math.abs(t.left - t.right) < 1e-9 ? " With equal left and right turning, forward must be at least 1/9 ≈ 0.111." : "";
  return {
    ok: false,
    reason: "triangle",
    field: "forward",
    message:
      `No unitary node has these probabilities: ${labels[longest]} = ${fmt(sides[longest])} ` +
      `is longer than ${labels[others[0]]} + ${labels[others[1]]} = ${fmt(sides[others[0]] + sides[others[1]])}, ` +
      `so the three cannot close a triangle. ${rangeText}${equalHint}`,
    forwardRange: range,
    suggestion,
  };
}

/** Barycentric (forward, left, right) to x, y in a unit triangle: forward at top, left bottom-left, right bottom-right. */
export function toXY({ forward, left, right }: Triple): [number, number] {
  const top: [number, number] = [0.5, 0];
  const bl: [number, number] = [0, Math.sqrt(3) / 2];
  const br: [number, number] = [1, Math.sqrt(3) / 2];
  return [forward * top[0] + left * bl[0] + right * br[0], forward * top[1] + left * bl[1] + right * br[1]];
}

/**
 * Boundary of the reachable region: three arcs, each where one side of the triangle equals the
 * sum of the others. With x = 1/sqrt(f), y = 1/sqrt(l), z = 1/sqrt(r) the condition reads
 * "x, y, z close a triangle"; on the arc opposite the forward corner x = y + z, parametrised by
 * s = y / (y + z): f = 1/k^2, l = 1/(s k)^2, r = 1/((1-s) k)^2 with k^2 = 1 + 1/s^2 + 1/(1-s)^2.
 */
export function reachableBoundary(samplesPerArc = 120): Triple[] {
  const arc: [number, number, number][] = [];
  for (let i = 1; i < samplesPerArc; i++) {
    const s = i / samplesPerArc;
    const k2 = 1 + 1 / (s * s) + 1 / ((1 - s) * (1 - s));
    arc.push([1 / k2, 1 / (s * s * k2), 1 / ((1 - s) * (1 - s) * k2)]);
  }
  // arc runs from the left corner (s -> 0) to the right corner (s -> 1), minimum forward 1/9 at s = 1/2.
  const out: Triple[] = [{ forward: 0, left: 1, right: 0 }];
  for (const [a, b, c] of arc) out.push({ forward: a, left: b, right: c });
  out.push({ forward: 0, left: 0, right: 1 });
  // Arc opposite the left corner: from right corner to forward corner (left smallest).
  for (const [a, b, c] of arc) out.push({ left: a, right: b, forward: c });
  out.push({ forward: 1, left: 0, right: 0 });
  // Arc opposite the right corner: from forward corner to left corner.
  for (const [a, b, c] of arc) out.push({ right: a, forward: b, left: c });
  return out;
}

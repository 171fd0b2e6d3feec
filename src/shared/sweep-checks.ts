/**
 * What a scan's axes ask that the engine refuses, in words, with the nearest valid choice. Every
 * value of every axis is applied to the base input with the engine's own applyParameter (the
 * schema's parse: the node rule, the torus's field steps, every bound), so a value is flagged
 * exactly when the server would refuse the point it lands on. The reachable range of a node
 * probability and the field step of a torus come from the engine too (reachableParameterRanges,
 * torusFieldStepTesla). The scan builder shows these before submitting; the server answers a
 * refused scan with the same sentence (src/server/sweeps).
 *
 * Axes are checked one at a time on the base input (the other axis at its base value); a
 * combination of two axes that only fails together is left to the point-by-point check.
 */
import {
  allowedTorusFields,
  applyParameter,
  EngineInputError,
  reachableParameterRanges,
  runsOnClosedSample,
  SWEEPABLE_PARAMETERS,
  torusFieldStepTesla,
  TORUS_FLUX_TOLERANCE,
  type ComputeInput,
} from "@/engine/browser";
import { resolveAxis, type Axis } from "./sweep-axes";

/** The nearest valid axis, in the form the axis was given: a range or a list of values. */
export type AxisFix = { from: number; to: number; points: number } | { values: number[] };

export interface AxisProblem {
  /** Index of the axis (0 or 1). */
  axis: number;
  parameter: string;
  /** node: a node probability out of the reachable range; torusField: a field a torus does not allow; refused: any other refusal. */
  reason: "node" | "torusField" | "refused";
  /** The axis values the engine refuses, in axis order. */
  refused: number[];
  /** How many values the axis has. */
  total: number;
  /** What is wrong and what is allowed, in words. */
  message: string;
  /** node: the values the engine accepts, as intervals (every value inside one is accepted). */
  allowedRanges: { min: number; max: number }[];
  /** torusField: the step and the allowed fields nearest the ends of the axis, tesla. */
  fieldStepTesla: number | null;
  allowedFields: number[];
  /** The nearest valid axis (null when none can be offered). */
  fix: AxisFix | null;
  /** The fix in words, for its button. */
  fixLabel: string | null;
}

/** A short name of a sweepable parameter in words ("forward probability", "perpendicular magnetic field"). */
export function parameterWords(parameter: string): string {
  const p = SWEEPABLE_PARAMETERS.find((x) => x.name === parameter);
  return p ? p.description.replace(/ \(.*\)$/, "") : parameter;
}

/** A number as people read it: up to 6 significant digits, no trailing noise. */
export function plain(x: number): string {
  if (x === 0) return "0";
  const a = Math.abs(x);
  if (a >= 1e6 || a < 1e-4)
    return x
      .toExponential(4)
      .replace(/\.?0+e/, "e")
      .replace("e+", "e");
  return String(Number(x.toPrecision(6)));
}

function listValues(values: number[], unit: string, most = 6): string {
  const u = unit && unit !== "1" ? ` ${unit}` : "";
  const shown = values.slice(0, most).map((v) => `${plain(v)}${u}`);
  return values.length > most ? `${shown.join(", ")} and ${values.length - most} more` : shown.join(", ");
}

const ceilTo = (x: number, d: number) => Math.ceil(x * 10 ** d - 1e-9) / 10 ** d;
const floorTo = (x: number, d: number) => Math.floor(x * 10 ** d + 1e-9) / 10 ** d;

/** The engine's verdict on one axis value: null when the point's input parses, else the engine's message. */
function engineRefusal(base: ComputeInput, parameter: string, value: number): string | null {
  try {
    applyParameter(base, parameter, value);
    return null;
  } catch (err) {
    if (err instanceof EngineInputError) return err.message;
    throw err;
  }
}

/** Every axis that asks for values the engine refuses, in words, with the nearest valid axis. */
export function checkSweepAxes(base: ComputeInput, axes: Axis[]): AxisProblem[] {
  const problems: AxisProblem[] = [];
  axes.forEach((axis, k) => {
    const { parameter, values } = resolveAxis(axis);
    const refusals = values.map((v) => engineRefusal(base, parameter, v));
    const refused = values.filter((_, i) => refusals[i] !== null);
    if (refused.length === 0) return;
    const firstReason = refusals.find((r) => r !== null) as string;
    const unit = SWEEPABLE_PARAMETERS.find((p) => p.name === parameter)?.unit ?? "";
    const head = `Axis ${k + 1}, ${parameterWords(parameter)}: ${refused.length} of ${values.length} values (${listValues(refused, unit)})`;
    const problem =
      nodeProblem(base, axis, parameter, values, refused, head) ??
      torusProblem(base, axis, parameter, values, refused, head) ??
      ({
        reason: "refused",
        message: `${head} ${refused.length === 1 ? "is" : "are"} refused: ${firstReason}.`,
        allowedRanges: [],
        fieldStepTesla: null,
        allowedFields: [],
        fix: null,
        fixLabel: null,
      } as const);
    problems.push({ axis: k, parameter, refused, total: values.length, ...problem });
  });
  return problems;
}

type Found = Omit<AxisProblem, "axis" | "parameter" | "refused" | "total">;

function nodeProblem(base: ComputeInput, axis: Axis, parameter: string, values: number[], refused: number[], head: string): Found | null {
  if (!parameter.startsWith("node.") || parameter === "node.phaseRad") return null;
  const net = base.network;
  const ranges = reachableParameterRanges(net, parameter);
  if (ranges === null) return null;
  // The ranges are the engine's: a refused value inside one has another reason (reported as such).
  if (refused.some((v) => ranges.some((r) => v >= r.min && v <= r.max))) return null;
  const node = net.node as { forward?: number; left?: number; right?: number; turning?: number };
  const spread = net.disorder.forwardSpread;
  let why: string;
  if (parameter === "node.turning") {
    why = `with a forward spread of ${plain(spread)}, every node's turning probability (the value ± ${plain(spread / 2)}) must stay within 0 and 1`;
  } else {
    const turn = (node.left ?? 0) + (node.right ?? 0);
    const t = turn > 0 ? (node.left ?? 0) / turn : 0.5;
    const rule = "no unitary node has them (the amplitudes √(forward·right), √(left·forward) and √(right·left) must close a triangle)";
    why =
      parameter === "node.forward"
        ? `${rule}. A scan over the forward probability keeps left and right turning in the network's ratio ${plain(t)} : ${plain(1 - t)}` +
          (spread > 0 ? `, and with a forward spread of ${plain(spread)} every node's forward ± ${plain(spread / 2)} must be reachable too` : "")
        : `${rule}. A scan over the ${parameter === "node.left" ? "left" : "right"}-turn probability keeps forward at ${plain(node.forward ?? 0)} and gives the rest to the other turn`;
  }
  const is = refused.length === 1 ? "is" : "are";
  if (ranges.length === 0) {
    return {
      reason: "node",
      message: `${head} ${is} not reachable: ${why}, and no value of it is reachable with this network's node. Change the node on the network first.`,
      allowedRanges: [],
      fieldStepTesla: null,
      allowedFields: [],
      fix: null,
      fixLabel: null,
    };
  }
  const w = parameterWords(parameter);
  const between = ranges.map((r) => `between ${plain(r.min)} and ${plain(r.max)}`).join(" or ");
  const allowedText = `at that ${parameter === "node.turning" ? "spread" : "setting"} the ${w} must lie ${between}`;
  // The interval nearest to the axis, its ends rounded inwards to four decimals so every value of the offered axis is accepted.
  const axisLo = Math.min(...values);
  const axisHi = Math.max(...values);
  // the gap between the axis and an interval, or minus their overlap: smaller is nearer
  const distance = (r: { min: number; max: number }) =>
    Math.max(0, r.min - axisHi, axisLo - r.max) - Math.max(0, Math.min(axisHi, r.max) - Math.max(axisLo, r.min));
  const range = ranges.reduce((a, b) => (distance(b) < distance(a) ? b : a));
  let lo = ceilTo(range.min, 4);
  let hi = floorTo(range.max, 4);
  if (lo > hi) [lo, hi] = [range.min, range.max];
  const clamp = (v: number) => Math.min(hi, Math.max(lo, v));
  let fix: AxisFix;
  let fixLabel: string;
  if ("values" in axis) {
    const kept = axis.values.filter((v) => !refused.includes(v));
    const values = kept.length > 0 ? kept : [...new Set(axis.values.map(clamp))];
    fix = { values };
    fixLabel = `Use the values ${listValues(values, "")}`;
  } else {
    let from = clamp(axis.from);
    let to = clamp(axis.to);
    if (from === to && axis.points > 1) [from, to] = axis.from <= axis.to ? [lo, hi] : [hi, lo];
    fix = { from, to, points: axis.points };
    fixLabel = `Scan from ${plain(from)} to ${plain(to)} (${axis.points} points)`;
  }
  return {
    reason: "node",
    message: `${head} ${is} not reachable: ${why}; ${allowedText}.`,
    allowedRanges: ranges,
    fieldStepTesla: null,
    allowedFields: [],
    fix,
    fixLabel,
  };
}

function torusProblem(base: ComputeInput, axis: Axis, parameter: string, values: number[], refused: number[], head: string): Found | null {
  if (parameter !== "fieldTesla" || !runsOnClosedSample(base.computation)) return null;
  const step = torusFieldStepTesla(base.network);
  if (step === null) return null;
  const quanta = (v: number) => v / step;
  const whole = (v: number) => Math.abs(quanta(v) - Math.round(quanta(v))) <= TORUS_FLUX_TOLERANCE;
  // Only the field rule: a refused value that is a whole number of quanta has another reason.
  if (refused.some(whole)) return null;
  // the allowed fields nearest each end of the axis (an allowed end is its own nearest)
  const ends = "values" in axis ? [Math.min(...values), Math.max(...values)] : [axis.from, axis.to];
  const nearest = ends.map((v) => {
    if (whole(v)) return [Math.round(quanta(v)) * step];
    const { below, above } = allowedTorusFields(base.network, v, 1);
    return [below[0], above[0]];
  });
  const allowed = [...new Set(nearest.flat())].sort((a, b) => a - b);
  const endText = ends.map((v, i) => `${nearest[i].map((x) => `${plain(x)} T`).join(" and ")} (${i === 0 ? "from" : "to"} ${plain(v)} T)`).join("; ");
  const { columns, rows } = base.network.size;
  const what = base.computation.kind === "ldos" ? "a local density of states map" : "a density of states from the sample";
  const is = refused.length === 1 ? "is" : "are";
  const message =
    `${head} ${is} not allowed: ${what} runs on the closed periodic sample (a torus), which holds a whole number of flux quanta h/e, ` +
    `so the field must be a multiple of ${plain(step)} T for this ${columns} × ${rows} sample (one flux quantum through the whole sample). ` +
    `The allowed fields nearest the ends of the axis: ${endText}. Or give the network open transverse edges: a ring holds any field.`;
  let fix: AxisFix;
  let fixLabel: string;
  if ("values" in axis) {
    const snapped = [...new Set(axis.values.map((v) => Math.round(quanta(v))))].map((n) => n * step);
    fix = { values: snapped };
    fixLabel = `Snap to ${listValues(snapped, "T")}`;
  } else {
    const n0 = Math.round(quanta(axis.from));
    const n1 = Math.round(quanta(axis.to));
    const span = Math.abs(n1 - n0);
    const sign = n1 >= n0 ? 1 : -1;
    // the same number of points where the range holds them; a range narrower than one step grows to the next allowed fields
    let points = axis.points;
    let k = 1;
    if (axis.points > 1 && span > 0) {
      k = Math.max(1, Math.floor(span / (axis.points - 1)));
      points = Math.min(axis.points, Math.floor(span / k) + 1);
    }
    const from = n0 * step;
    const to = (n0 + sign * k * (points - 1)) * step;
    fix = { from, to, points };
    fixLabel = `Snap the axis to ${points} allowed field${points === 1 ? "" : "s"} from ${plain(from)} T to ${plain(to)} T (every ${k === 1 ? "" : `${k} `}flux quant${k === 1 ? "um" : "a"})`;
  }
  return { reason: "torusField", message, allowedRanges: [], fieldStepTesla: step, allowedFields: allowed, fix, fixLabel };
}

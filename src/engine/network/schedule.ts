/**
 * Absorption schedule: the order in which the slice composition adds nodes to the growing
 * sample. Nodes are taken column by column (by their lattice abscissa); within a column pair the
 * order that needs the fewest feedback loops is chosen by a cheap integer simulation, and nodes
 * of one abscissa are grouped (no links among members) so that each update is a rank-q product.
 */
import type { NetworkGraph } from "./graph";

const MAX_GROUP_NODES = 16;
const MAX_GROUP_FEEDBACK = 16;

/**
 * `order: "columns"` keeps the plain left-to-right order by abscissa (no half-column shifts), so
 * that a clean cut exists between every two node abscissae (localization reads T there).
 */
export function buildSchedule(g: NetworkGraph, keys?: Float64Array, order: "cheapest" | "columns" = "cheapest"): void {
  const n = g.nodeCount;
  const key = keys ?? g.nodeX;
  let best: { order: number[]; cost: number; tk: Float64Array } | null = null;
  for (const cand of candidateOrders(g, key, order)) {
    const cost = simulate(g, cand.order);
    if (!best || cost < best.cost) best = { ...cand, cost };
  }
  const { order: nodeOrder, tk } = best as { order: number[]; cost: number; tk: Float64Array };
  // groups
  const absorbed = new Uint8Array(n);
  const groups: Int32Array[] = [];
  let i = 0;
  while (i < n) {
    let j = i;
    while (j < n && tk[nodeOrder[j]] === tk[nodeOrder[i]]) j++;
    // chunk nodeOrder[i..j)
    let cur: number[] = [],
      curQ = 0;
    const inGroup = new Set<number>();
    const flush = () => {
      if (cur.length) {
        groups.push(Int32Array.from(cur));
        for (const m of cur) absorbed[m] = 1;
      }
      cur = [];
      curQ = 0;
      inGroup.clear();
    };
    for (let t = i; t < j; t++) {
      const m = nodeOrder[t];
      let q = 0,
        linked = false;
      for (let s = g.slotOffset[m]; s < g.slotOffset[m] + g.slotCount[m]; s++) {
        const to = g.chToNode[g.outChannel[s]],
          from = g.chFromNode[g.inChannel[s]];
        if (to >= 0 && absorbed[to]) q++;
        if ((to >= 0 && inGroup.has(to)) || (from >= 0 && inGroup.has(from)) || to === m || from === m) linked = true;
      }
      if (cur.length > 0 && (linked || cur.length >= MAX_GROUP_NODES || curQ + q > MAX_GROUP_FEEDBACK)) flush();
      cur.push(m);
      curQ += q;
      inGroup.add(m);
    }
    flush();
    i = j;
  }
  g.schedule = groups;
  // cuts: after group t all absorbed keys < all remaining keys (original abscissa)
  const prefixMax: number[] = [];
  let mx = -Infinity;
  for (const grp of groups) {
    for (const m of grp) mx = Math.max(mx, key[m]);
    prefixMax.push(mx);
  }
  const suffixMin: number[] = new Array(groups.length).fill(Infinity);
  let mn = Infinity;
  for (let t = groups.length - 1; t >= 0; t--) {
    suffixMin[t] = mn;
    for (const m of groups[t]) mn = Math.min(mn, key[m]);
  }
  const cutAfter: number[] = [],
    cutX: number[] = [];
  for (let t = 0; t < groups.length - 1; t++) {
    if (prefixMax[t] < suffixMin[t] - 1e-9) {
      cutAfter.push(t);
      cutX.push((prefixMax[t] + suffixMin[t]) / 2);
    }
  }
  g.cutAfter = Int32Array.from(cutAfter);
  g.cutX = Float64Array.from(cutX);
}

/**
 * The node orders the schedules choose from: by abscissa key (in lattice steps), and with the odd
 * or the even half-steps moved back by 1.5 steps (a column absorbed from its other side); ties by
 * y, then index. `tk` is each node's transformed key (nodes of one key form a level).
 */
export function candidateOrders(g: NetworkGraph, key: Float64Array, order: "cheapest" | "columns"): { order: number[]; tk: Float64Array }[] {
  const n = g.nodeCount;
  // keys are multiples of a lattice step; find it
  const uniq = Array.from(new Set(Array.from(key, (k) => Math.round(k * 1e6) / 1e6))).sort((a, b) => a - b);
  let step = Infinity;
  for (let i = 1; i < uniq.length; i++) step = Math.min(step, uniq[i] - uniq[i - 1]);
  if (!Number.isFinite(step)) step = 1;
  const ik = new Float64Array(n);
  const base = uniq[0] ?? 0;
  for (let i = 0; i < n; i++) ik[i] = Math.round((key[i] - base) / step);
  const transforms: ((k: number) => number)[] = [(k) => k, (k) => (k % 2 === 1 ? k - 1.5 : k), (k) => (k % 2 === 0 ? k - 1.5 : k)];
  // ranks of the distinct y values, so that one numeric sort of (key, y, index) packed into a
  // double gives the order of the comparison (tk, then y, then index) without a comparator
  const ys = Float64Array.from(new Set(g.nodeY)).sort();
  const yRank = new Map<number, number>();
  ys.forEach((y, r) => yRank.set(y, r));
  return (order === "columns" ? transforms.slice(0, 1) : transforms).map((t) => {
    const tk = new Float64Array(n);
    let lo = Infinity,
      hi = -Infinity;
    for (let i = 0; i < n; i++) {
      tk[i] = t(ik[i]);
      lo = Math.min(lo, tk[i]);
      hi = Math.max(hi, tk[i]);
    }
    // transformed keys are multiples of 1/2
    const levels = Math.round((hi - lo) * 2) + 1;
    let seq: number[];
    if (levels * ys.length * n < 2 ** 52) {
      const packed = new Float64Array(n);
      for (let i = 0; i < n; i++) packed[i] = (Math.round((tk[i] - lo) * 2) * ys.length + (yRank.get(g.nodeY[i]) as number)) * n + i;
      packed.sort();
      seq = Array.from(packed, (v) => v % n);
    } else seq = Array.from({ length: n }, (_, i) => i).sort((a, b) => tk[a] - tk[b] || g.nodeY[a] - g.nodeY[b] || a - b);
    return { order: seq, tk };
  });
}

/** Rough cost of an order: sum over nodes of feedback count x frontier rows x frontier columns. */
function simulate(g: NetworkGraph, order: number[]): number {
  const absorbed = new Uint8Array(g.nodeCount);
  let rows = 0,
    cols = 0,
    cost = 0;
  for (const m of order) {
    let q = 0;
    for (let s = g.slotOffset[m]; s < g.slotOffset[m] + g.slotCount[m]; s++) {
      const from = g.chFromNode[g.inChannel[s]];
      if (from >= 0 && absorbed[from]) rows--;
      else cols++;
      const to = g.chToNode[g.outChannel[s]];
      if (to >= 0 && absorbed[to]) {
        q++;
        cols--;
      } else rows++;
    }
    cost += q * (rows + 1) * (cols + 1);
    absorbed[m] = 1;
  }
  return cost;
}

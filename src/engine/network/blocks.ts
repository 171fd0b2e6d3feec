/**
 * Block schedule: the order in which the block path of the slice composition
 * (`scattering/block-step.ts`) absorbs the network, in blocks of up to `maxNodes` nodes (about a
 * column of the lattice) instead of the general schedule's groups of at most 16 unlinked nodes.
 *
 * A block may contain links among its members as long as every one of them runs from an earlier
 * member to a later one (a forward, loop-free graph): the block's own scattering matrix is then a
 * sparse forward substitution, and absorbing it is one q x q solve and one rank-q update of the
 * frontier, with q the block's outputs that lead back into the absorbed part (about W per column
 * of a W-row strip). The node order is one of the general schedule's candidates
 * (`candidateOrders`), the cheapest by a simulation of the block updates.
 */
import type { NetworkGraph } from "./graph";
import { candidateOrders } from "./schedule";

/**
 * Largest block, in nodes, and (in `blockSchedule`) at most two levels per block: on the
 * triangular lattice the two half-columns of one column, linked odd -> even, so one block is one
 * column and q = W. Measured on 2026-12-03 (triangular W x W cylinder, both valleys, CPU time,
 * best of 3-4 rounds, load average 5-8 on 2 cores): levels per block 1 / 2 / 3 / 4 took
 * 0.50 / 0.42 / 0.56 / 0.56 s at W = 96 (OpenBLAS, one thread) and 0.59 / 0.43 / - / 0.66 s at
 * W = 64 (TypeScript kernels); the general groups 0.51 and 0.49 s. More levels make q grow again
 * (the later columns' outputs feed the earlier ones). Capping the nodes at 16, 32 or 64 inside
 * the two levels measured the same as no cap within the noise at W = 96; at W = 192 (both
 * valleys, wall, default OpenBLAS threads) a cap of 96 nodes took 5.29 s against 3.60 s without
 * one (general groups 4.25 s), and at W = 288 the whole column took 14.2 s against 25.5 s for the
 * general groups. So the cap is large: it only bounds the q x q systems of very tall strips
 * (memory 16 q^2 bytes).
 */
export const MAX_BLOCK_NODES = 1024;

export interface BlockScheduleOptions {
  /** "columns": plain order by abscissa, a block never spans two abscissae (clean cuts after every level). */
  order?: "cheapest" | "columns";
  maxNodes?: number;
  /** Most levels (node abscissae of the chosen order) in one block. */
  maxLevels?: number;
}

const cache = new WeakMap<NetworkGraph, Map<string, Int32Array[]>>();

/** The block schedule of a graph (cached per graph and options). */
export function blockSchedule(g: NetworkGraph, opts: BlockScheduleOptions = {}): Int32Array[] {
  const order = opts.order ?? "cheapest",
    maxNodes = opts.maxNodes ?? MAX_BLOCK_NODES,
    maxLevels = opts.maxLevels ?? (order === "columns" ? 1 : 2);
  const k = `${order}/${maxNodes}/${maxLevels}`;
  let m = cache.get(g);
  if (!m) cache.set(g, (m = new Map()));
  const hit = m.get(k);
  if (hit) return hit;
  let best: { blocks: Int32Array[]; cost: number } | null = null;
  for (const cand of candidateOrders(g, g.nodeX, order)) {
    const blocks = chunk(g, cand.order, cand.tk, maxNodes, maxLevels);
    const cost = simulateBlocks(g, blocks);
    if (!best || cost < best.cost) best = { blocks, cost };
  }
  const blocks = (best as { blocks: Int32Array[] }).blocks;
  m.set(k, blocks);
  return blocks;
}

/** Greedy blocks along `order`: a node joins the current block unless it would close a link from a later to an earlier member. */
function chunk(g: NetworkGraph, order: number[], tk: Float64Array, maxNodes: number, maxLevels: number): Int32Array[] {
  const pos = new Int32Array(g.nodeCount).fill(-1);
  const blocks: Int32Array[] = [];
  let cur: number[] = [],
    levels = 0,
    lastKey = NaN;
  const flush = () => {
    if (cur.length) blocks.push(Int32Array.from(cur));
    for (const m of cur) pos[m] = -1;
    cur = [];
    levels = 0;
    lastKey = NaN;
  };
  for (const m of order) {
    let backward = false;
    for (let s = g.slotOffset[m]; s < g.slotOffset[m] + g.slotCount[m]; s++) {
      const to = g.chToNode[g.outChannel[s]];
      // an output into a member already in the block (or into itself) would be a loop inside it
      if (to === m || (to >= 0 && pos[to] >= 0)) backward = true;
    }
    const newLevel = tk[m] !== lastKey;
    if (cur.length > 0 && (backward || cur.length >= maxNodes || (newLevel && levels >= maxLevels))) flush();
    if (tk[m] !== lastKey) {
      levels++;
      lastKey = tk[m];
    }
    pos[m] = cur.length;
    cur.push(m);
  }
  flush();
  return blocks;
}

/** Rough cost of a block schedule: per block q x (rows + 1) x (cols + 1) for the update, plus q^2 (rows + q) for the solve. */
function simulateBlocks(g: NetworkGraph, blocks: Int32Array[]): number {
  const absorbed = new Uint8Array(g.nodeCount);
  const blockOf = new Int32Array(g.nodeCount).fill(-1);
  let rows = 0,
    cols = 0,
    cost = 0;
  for (let k = 0; k < blocks.length; k++) {
    const b = blocks[k];
    let q = 0;
    for (const m of b) blockOf[m] = k;
    const inBlock = { has: (m: number) => blockOf[m] === k };
    for (const m of b) {
      for (let s = g.slotOffset[m]; s < g.slotOffset[m] + g.slotCount[m]; s++) {
        const from = g.chFromNode[g.inChannel[s]];
        if (from >= 0 && absorbed[from]) rows--;
        else if (!(from >= 0 && inBlock.has(from))) cols++;
        const to = g.chToNode[g.outChannel[s]];
        if (to >= 0 && absorbed[to]) {
          q++;
          cols--;
        } else if (!(to >= 0 && inBlock.has(to))) rows++;
      }
    }
    cost += q * (rows + 1) * (cols + 1) + q * q * (rows + q);
    for (const m of b) absorbed[m] = 1;
  }
  return cost;
}

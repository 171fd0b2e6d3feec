/**
 * A network as a directed graph: nodes (unitary matrices from in slots to out slots) and channels
 * (directed links between an out slot and an in slot, or lead channels that enter or leave the
 * sample). Positions are in units of the link length l. Built by network/lattice.ts.
 */
import { buildSchedule } from "./schedule";

export const CH_LINK = 0,
  CH_LEFT_IN = 1,
  CH_LEFT_OUT = 2,
  CH_RIGHT_IN = 3,
  CH_RIGHT_OUT = 4,
  /** A side contact on an open edge (Hall bar): channels from the contact into the sample and from the sample into it. */
  CH_CONTACT_IN = 5,
  CH_CONTACT_OUT = 6;

export interface NetworkGraph {
  nodeCount: number;
  /** Number of in (= out) slots of each node. */
  slotCount: Int32Array;
  /** First slot of each node in inChannel/outChannel (prefix sums of slotCount). */
  slotOffset: Int32Array;
  /** Offset (in complex elements) of each node's packed k x k matrix in `matrices`. */
  matrixOffset: Int32Array;
  matrices: Float64Array;
  /** Channel arriving at / leaving from each node slot. */
  inChannel: Int32Array;
  outChannel: Int32Array;
  channelCount: number;
  /** Source and target node and slot of each channel (-1 for a lead end). */
  chFromNode: Int32Array;
  chFromSlot: Int32Array;
  chToNode: Int32Array;
  chToSlot: Int32Array;
  /** CH_LINK or one of the lead kinds. */
  chKind: Uint8Array;
  /** Static phases of links: Peierls phase (for the valley's orientation) and disorder phase. */
  chThetaB: Float64Array;
  chThetaDis: Float64Array;
  /** Unwrapped segment of each channel: x1, y1, x2, y2 (units of l). */
  chSegment: Float64Array;
  /** 1 for the links that belong to the lattice, 0 for edge links (ending at a virtual node). */
  nodeReal: Uint8Array;
  nodeX: Float64Array;
  nodeY: Float64Array;
  /** Absorption order: groups of nodes with no link among them. */
  schedule: Int32Array[];
  /** After schedule[g] the sample to the left of cutX[c] is complete: cutAfter[c] = g. */
  cutAfter: Int32Array;
  cutX: Float64Array;
  /** Number of identical channel copies this graph stands for (channelsPerLink when not mixed). */
  copies: number;
  /** Side contacts only: the contact (index into the sample's contact windows) of each channel, -1 for the others. */
  chContact?: Int32Array;
}

/** Complex phase factor of every channel at energy phase thetaE = E tau and damping eta:
 * exp(i (thetaE + thetaB + thetaDis) - eta) for links, 1 for lead channels. */
export function channelPhases(g: NetworkGraph, thetaE: number, eta = 0): Float64Array {
  const z = new Float64Array(2 * g.channelCount);
  const damp = Math.exp(-eta);
  for (let c = 0; c < g.channelCount; c++) {
    if (g.chKind[c] !== CH_LINK) {
      z[2 * c] = 1;
      continue;
    }
    const ph = thetaE + g.chThetaB[c] + g.chThetaDis[c];
    z[2 * c] = damp * Math.cos(ph);
    z[2 * c + 1] = damp * Math.sin(ph);
  }
  return z;
}

/** Time reversal (the valley K' network of physics.md): links reversed, node matrices
 * transposed, Peierls phases negated, disorder phases kept, lead in/out exchanged.
 * `withSchedule = false` leaves `schedule` empty (for callers that absorb it on the block path only). */
export function reverseGraph(g: NetworkGraph, withSchedule = true): NetworkGraph {
  const matrices = new Float64Array(g.matrices.length);
  for (let n = 0; n < g.nodeCount; n++) {
    const k = g.slotCount[n],
      o = 2 * g.matrixOffset[n];
    for (let i = 0; i < k; i++)
      for (let j = 0; j < k; j++) {
        matrices[o + 2 * (i * k + j)] = g.matrices[o + 2 * (j * k + i)];
        matrices[o + 2 * (i * k + j) + 1] = g.matrices[o + 2 * (j * k + i) + 1];
      }
  }
  const kind = new Uint8Array(g.channelCount);
  const swap = [CH_LINK, CH_LEFT_OUT, CH_LEFT_IN, CH_RIGHT_OUT, CH_RIGHT_IN, CH_CONTACT_OUT, CH_CONTACT_IN];
  for (let c = 0; c < g.channelCount; c++) kind[c] = swap[g.chKind[c]];
  const seg = new Float64Array(g.chSegment.length);
  for (let c = 0; c < g.channelCount; c++) {
    seg[4 * c] = g.chSegment[4 * c + 2];
    seg[4 * c + 1] = g.chSegment[4 * c + 3];
    seg[4 * c + 2] = g.chSegment[4 * c];
    seg[4 * c + 3] = g.chSegment[4 * c + 1];
  }
  const thetaB = new Float64Array(g.channelCount);
  for (let c = 0; c < g.channelCount; c++) thetaB[c] = -g.chThetaB[c];
  const r: NetworkGraph = {
    ...g,
    matrices,
    inChannel: g.outChannel,
    outChannel: g.inChannel,
    chFromNode: g.chToNode,
    chFromSlot: g.chToSlot,
    chToNode: g.chFromNode,
    chToSlot: g.chFromSlot,
    chKind: kind,
    chThetaB: thetaB,
    chSegment: seg,
    schedule: [],
    cutAfter: new Int32Array(0),
    cutX: new Float64Array(0),
  };
  if (withSchedule) buildSchedule(r);
  return r;
}

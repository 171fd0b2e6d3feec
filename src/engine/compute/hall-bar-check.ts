/**
 * The checks of a Hall bar computation that depend on the network (compute/hall-bar.ts computes
 * it); apart so that the schema's parser can run them without importing the computation.
 */
import { EngineInputError } from "../errors";
import { CH_CONTACT_IN, type NetworkGraph } from "../network/graph";
import { buildSample, type ContactWindow } from "../network/lattice";
import type { HallBarComputation, Network } from "../schema";

export interface HallBarContact extends ContactWindow {
  name: string;
}

export const SOURCE = "source";
export const DRAIN = "drain";

/** The six-terminal bar: top1, bottom1 at column floor(C/3), top2, bottom2 at floor(2C/3), one column wide. */
export function defaultContacts(columns: number): HallBarContact[] {
  const a = Math.floor(columns / 3),
    b = Math.floor((2 * columns) / 3);
  return [
    { name: "top1", edge: "top", fromColumn: a, toColumn: a },
    { name: "bottom1", edge: "bottom", fromColumn: a, toColumn: a },
    { name: "top2", edge: "top", fromColumn: b, toColumn: b },
    { name: "bottom2", edge: "bottom", fromColumn: b, toColumn: b },
  ];
}

/**
 * The checks a Hall bar computation needs beyond its schema (they depend on the network): open
 * transverse edges, contact windows inside the sample, not overlapping and each holding at least
 * one edge channel, names unique and not source/drain, measurements naming terminals that exist.
 * Returns the contacts in force (the default six-terminal bar when none are given).
 */
export function checkHallBar(net: Network, c: HallBarComputation, opts: { windows?: boolean } = {}): HallBarContact[] {
  if (net.transverse !== "open")
    throw new EngineInputError(
      "network.transverse",
      'a Hall bar needs open top and bottom edges for its side contacts: set network.transverse to "open" (a periodic sample has no edges)',
    );
  const columns = net.size.columns;
  const contacts = c.contacts ?? defaultContacts(columns);
  const names = new Set<string>([SOURCE, DRAIN]);
  contacts.forEach((k, i) => {
    const f = `computation.contacts.${i}`;
    if (names.has(k.name))
      throw new EngineInputError(
        `${f}.name`,
        k.name === SOURCE || k.name === DRAIN
          ? `"${k.name}" is the ${k.name === SOURCE ? "left" : "right"} lead; name the contact otherwise`
          : `"${k.name}" is used twice`,
      );
    names.add(k.name);
    if (k.toColumn < k.fromColumn) throw new EngineInputError(`${f}.toColumn`, `toColumn ${k.toColumn} is before fromColumn ${k.fromColumn}: an empty window`);
    if (k.toColumn > columns - 1) throw new EngineInputError(`${f}.toColumn`, `column ${k.toColumn} is outside the sample (columns 0 to ${columns - 1})`);
    contacts.forEach((o, j) => {
      if (j < i && o.edge === k.edge && o.fromColumn <= k.toColumn && k.fromColumn <= o.toColumn)
        throw new EngineInputError(
          `${f}.fromColumn`,
          `the window [${k.fromColumn}, ${k.toColumn}] overlaps "${o.name}" [${o.fromColumn}, ${o.toColumn}] on the ${k.edge} edge`,
        );
    });
  });
  c.measurements.forEach((m, i) => {
    for (const [which, pair] of [
      ["current", m.current],
      ["voltage", m.voltage],
    ] as const) {
      pair.forEach((t, j) => {
        if (!names.has(t)) throw new EngineInputError(`computation.measurements.${i}.${which}.${j}`, `no terminal "${t}"; terminals: ${[...names].join(", ")}`);
      });
      if (which === "current" && pair[0] === pair[1])
        throw new EngineInputError(`computation.measurements.${i}.current`, "the current must flow between two different terminals");
    }
  });
  if (contacts.length > 0 && opts.windows !== false)
    checkWindowsHoldChannels(net, contacts, buildSample(net, { mode: "leads", fluxPerPlaquette: 0, sample: 0, contacts }));
  return contacts;
}

/**
 * Every window must hold at least one edge channel (a square network's edge sites sit in every
 * other column), read off a sample graph built with these contacts.
 */
export function checkWindowsHoldChannels(net: Network, contacts: HallBarContact[], g: NetworkGraph): void {
  const counts = new Array<number>(contacts.length).fill(0);
  for (let ch = 0; ch < g.channelCount; ch++) if (g.chKind[ch] === CH_CONTACT_IN) counts[g.chContact![ch]]++;
  counts.forEach((n, i) => {
    if (n === 0)
      throw new EngineInputError(
        `computation.contacts.${i}`,
        `the window [${contacts[i].fromColumn}, ${contacts[i].toColumn}] on the ${contacts[i].edge} edge touches no edge channel` +
          (net.lattice === "square" ? " (the square network's edge sites are in the odd columns)" : "") +
          "; widen or move it",
      );
  });
}

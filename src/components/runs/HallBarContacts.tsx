"use client";

import { useRef, useState, type PointerEvent } from "react";
import { defaultContacts, type HallBarContact } from "@/engine/browser";
import type { NetworkShape } from "@/lib/lattice";
import { NetworkDrawing } from "@/components/network/NetworkDrawing";

/** A side contact of a Hall bar: a window of columns on the top or bottom edge (engine schema, kind hallBar). */
export type ContactDraft = HallBarContact;

/** The six-terminal bar the engine uses when no contacts are given (the engine's own default). */
export const defaultBar = (columns: number): ContactDraft[] => defaultContacts(columns);

/** Problems of the contacts before anything is sent (the engine checks the same and more). */
export function contactProblems(contacts: ContactDraft[], columns: number): string[] {
  const out: string[] = [];
  const names = new Set<string>(["source", "drain"]);
  contacts.forEach((c, i) => {
    const label = c.name || `contact ${i + 1}`;
    if (!/^[A-Za-z0-9_-]{1,40}$/.test(c.name)) out.push(`${label}: a name of letters, digits, "_" and "-" (at most 40).`);
    else if (names.has(c.name)) out.push(`${label}: the name is taken${c.name === "source" || c.name === "drain" ? " by a lead" : ""}.`);
    names.add(c.name);
    if (!Number.isInteger(c.fromColumn) || !Number.isInteger(c.toColumn) || c.fromColumn < 0 || c.toColumn > columns - 1)
      out.push(`${label}: columns must be whole numbers from 0 to ${columns - 1}.`);
    else if (c.toColumn < c.fromColumn) out.push(`${label}: the window ends before it starts.`);
    contacts.forEach((o, j) => {
      if (j < i && o.edge === c.edge && o.fromColumn <= c.toColumn && c.fromColumn <= o.toColumn)
        out.push(`${label} overlaps ${o.name} on the ${c.edge} edge.`);
    });
  });
  return out;
}

const W = 640,
  H = 150,
  PAD = 36,
  BAR_TOP = 48,
  BAR_H = 54;

/**
 * The Hall bar's contacts on a drawing of the sample (left lead source, right lead drain, the
 * top and bottom edges in columns) and in a table: drag a window along its edge, or type its
 * columns; add, remove, or go back to the six-terminal bar.
 */
export function HallBarContacts({
  shape,
  contacts,
  onChange,
}: {
  /** The network's lattice, size and edges (the drawing of the network with the contacts on it). */
  shape: NetworkShape;
  contacts: ContactDraft[];
  onChange: (c: ContactDraft[]) => void;
}) {
  const columns = shape.columns;
  const openEdges = shape.transverse === "open";
  const colW = (W - 2 * PAD) / Math.max(1, columns);
  const svg = useRef<SVGSVGElement>(null);
  const [drag, setDrag] = useState<{ index: number; grabColumn: number; from: number } | null>(null);
  const columnAt = (clientX: number) => {
    const box = svg.current?.getBoundingClientRect();
    if (!box) return 0;
    const x = ((clientX - box.left) / box.width) * W;
    return Math.floor((x - PAD) / colW);
  };
  const onDown = (i: number) => (e: PointerEvent<SVGRectElement>) => {
    (e.target as Element).setPointerCapture?.(e.pointerId);
    setDrag({ index: i, grabColumn: columnAt(e.clientX), from: contacts[i].fromColumn });
  };
  const onMove = (e: PointerEvent<SVGSVGElement>) => {
    if (!drag) return;
    const c = contacts[drag.index];
    const width = c.toColumn - c.fromColumn;
    const from = Math.max(0, Math.min(columns - 1 - width, drag.from + columnAt(e.clientX) - drag.grabColumn));
    if (from !== c.fromColumn) onChange(contacts.map((k, j) => (j === drag.index ? { ...k, fromColumn: from, toColumn: from + width } : k)));
  };
  const set = (i: number, patch: Partial<ContactDraft>) => onChange(contacts.map((k, j) => (j === i ? { ...k, ...patch } : k)));
  const problems = contactProblems(contacts, columns);
  return (
    <fieldset className="tk-card col-span-full space-y-3" data-testid="hall-bar-contacts">
      <legend className="px-1 text-body font-semibold">Contacts of the Hall bar</legend>
      {!openEdges ? (
        <p role="alert" className="rounded-field bg-danger-soft p-2 text-caption text-danger">
          This network is periodic across (a cylinder): a Hall bar needs open top and bottom edges for its side contacts. Edit the network and set its
          transverse edges to open.
        </p>
      ) : null}
      {openEdges ? <NetworkDrawing shape={shape} height={260} contacts={contacts} label={`the network with the Hall bar's contacts on its edges`} /> : null}
      <p className="text-caption text-fg-soft">Drag a window along its edge in the strip below, or type its columns in the table.</p>
      <svg
        ref={svg}
        data-testid="contact-strip"
        viewBox={`0 0 ${W} ${H}`}
        className="w-full max-w-2xl touch-none select-none"
        role="img"
        aria-label={`Sample of ${columns} columns with the leads source (left) and drain (right) and ${contacts.length} side contacts: ${contacts
          .map((c) => `${c.name} on the ${c.edge} edge, columns ${c.fromColumn} to ${c.toColumn}`)
          .join("; ")}`}
        onPointerMove={onMove}
        onPointerUp={() => setDrag(null)}
        onPointerLeave={() => setDrag(null)}
      >
        <rect x={PAD} y={BAR_TOP} width={W - 2 * PAD} height={BAR_H} className="fill-surface-sunk stroke-line-strong" />
        <rect x={4} y={BAR_TOP} width={PAD - 8} height={BAR_H} className="fill-accent-soft stroke-accent" />
        <rect x={W - PAD + 4} y={BAR_TOP} width={PAD - 8} height={BAR_H} className="fill-accent-soft stroke-accent" />
        <text x={PAD / 2} y={BAR_TOP + BAR_H + 16} textAnchor="middle" className="fill-fg-soft text-[10px]">
          source
        </text>
        <text x={W - PAD / 2} y={BAR_TOP + BAR_H + 16} textAnchor="middle" className="fill-fg-soft text-[10px]">
          drain
        </text>
        {Array.from({ length: columns + 1 }, (_, i) =>
          columns <= 80 || i % 10 === 0 ? (
            <line key={i} x1={PAD + i * colW} x2={PAD + i * colW} y1={BAR_TOP} y2={BAR_TOP + BAR_H} className="stroke-line" strokeWidth={0.5} />
          ) : null,
        )}
        {contacts.map((c, i) => {
          const x = PAD + c.fromColumn * colW;
          const w = Math.max(colW, (c.toColumn - c.fromColumn + 1) * colW);
          const top = c.edge === "top";
          const y = top ? BAR_TOP - 22 : BAR_TOP + BAR_H;
          return (
            <g key={i} data-contact={c.name}>
              <rect
                x={x}
                y={y}
                width={w}
                height={22}
                rx={3}
                className={`cursor-ew-resize stroke-warm ${drag?.index === i ? "fill-warm" : "fill-warm-soft"}`}
                onPointerDown={onDown(i)}
              />
              <text x={x + w / 2} y={top ? y - 4 : y + 34} textAnchor="middle" className="pointer-events-none fill-fg text-[10px]">
                {c.name}
              </text>
            </g>
          );
        })}
      </svg>
      <table className="font-mono text-caption">
        <thead className="text-left text-fg-faint">
          <tr>
            <th className="pr-3">name</th>
            <th className="pr-3">edge</th>
            <th className="pr-3">from column</th>
            <th className="pr-3">to column</th>
            <th />
          </tr>
        </thead>
        <tbody>
          {contacts.map((c, i) => (
            <tr key={i} className="border-t border-line">
              <td className="pr-3">
                <input className="tk-field w-24" aria-label={`contact ${i + 1}: name`} value={c.name} onChange={(e) => set(i, { name: e.target.value })} />
              </td>
              <td className="pr-3">
                <select
                  className="tk-field"
                  aria-label={`${c.name || `contact ${i + 1}`}: edge`}
                  value={c.edge}
                  onChange={(e) => set(i, { edge: e.target.value as "top" | "bottom" })}
                >
                  <option value="top">top</option>
                  <option value="bottom">bottom</option>
                </select>
              </td>
              {(["fromColumn", "toColumn"] as const).map((k) => (
                <td key={k} className="pr-3">
                  <input
                    className="tk-field w-20"
                    inputMode="numeric"
                    aria-label={`${c.name || `contact ${i + 1}`}: ${k === "fromColumn" ? "from column" : "to column"}`}
                    value={String(c[k])}
                    onChange={(e) => set(i, { [k]: e.target.value.trim() === "" ? NaN : Number(e.target.value) })}
                  />
                </td>
              ))}
              <td>
                <button type="button" className="tk-btn-quiet" onClick={() => onChange(contacts.filter((_, j) => j !== i))}>
                  Remove
                </button>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <div className="flex flex-wrap gap-2">
        <button
          type="button"
          className="tk-btn-quiet"
          onClick={() => {
            let n = contacts.length + 1;
            while (contacts.some((c) => c.name === `contact${n}`)) n++;
            const col = Math.floor(columns / 2);
            onChange([...contacts, { name: `contact${n}`, edge: "top", fromColumn: col, toColumn: col }]);
          }}
        >
          Add a contact
        </button>
        <button type="button" className="tk-btn-quiet" onClick={() => onChange(defaultBar(columns))}>
          Back to the six-terminal bar
        </button>
      </div>
      <p className="text-caption text-fg-soft">
        R_xx = (V_top1 − V_top2) / I and R_xy = (V_top1 − V_bottom1) / I for a current from source to drain: keep those names for them. Drag a window along its
        edge or type its columns (0 to {columns - 1}); on the square network only odd columns hold edge channels.
      </p>
      {problems.length ? (
        <ul role="alert" className="list-disc pl-5 text-caption text-danger" data-testid="hall-bar-contact-problems">
          {problems.map((p, i) => (
            <li key={i}>{p}</li>
          ))}
        </ul>
      ) : null}
    </fieldset>
  );
}

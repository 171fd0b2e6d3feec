"use client";

import * as d3 from "d3";
import { useMemo } from "react";
import { num } from "@/lib/units";
import { SEQUENTIAL_STOPS } from "@/components/charts/palette";
import { NetworkDrawing } from "@/components/network/NetworkDrawing";
import { shapeOf, linkLengthNm } from "@/components/network/draft";
import { linkCountOf } from "@/lib/lattice";
import { exportCsv } from "@/lib/exportFigure";

const scale = d3.interpolateRgbBasis(SEQUENTIAL_STOPS);

/** The local density of states on every link, drawn on the network with a colour legend. */
export function LdosMap({ result, network, runId }: { result: Record<string, any>; network?: Record<string, any>; runId: string }) {
  const values: number[] = useMemo(() => {
    const v = result.ldosPerLink ?? result.perLink ?? result.ldos ?? result.values ?? [];
    return Array.isArray(v) ? v.map(Number) : [];
  }, [result]);
  const shape = useMemo(() => (network ? shapeOf(network, "K") : null), [network]);
  const [lo, hi] = useMemo(() => {
    const e = d3.extent(values.filter(Number.isFinite));
    return [e[0] ?? 0, e[1] ?? 1];
  }, [values]);
  const linkValues = useMemo(() => ({ values, color: (v: number) => scale(hi > lo ? (v - lo) / (hi - lo) : 0.5) }), [values, lo, hi]);
  if (!shape) return <p className="text-body text-fg-soft">The network of this run is not available for drawing.</p>;
  const matches = values.length === linkCountOf(shape);
  const unit = result.unit ?? "states / meV / link";
  return (
    <div className="space-y-3">
      {matches ? (
        <NetworkDrawing shape={shape} linkNm={linkLengthNm(network!)} linkValues={linkValues} height={480} label={`Local density of states on ${values.length} links`} />
      ) : (
        <p className="text-caption text-fg-faint">The map has {values.length} values; this drawing has {linkCountOf(shape)} links.</p>
      )}
      <div className="flex flex-wrap items-center gap-3" data-testid="ldos-legend">
        <span className="text-caption text-fg-soft">LDOS ({unit})</span>
        <span className="font-mono text-caption tk-num">{num(lo)}</span>
        <span aria-hidden className="h-3 w-48 rounded-sm" style={{ background: `linear-gradient(to right, ${SEQUENTIAL_STOPS.join(",")})` }} />
        <span className="font-mono text-caption tk-num">{num(hi)}</span>
        <button type="button" className="tk-btn-quiet" onClick={() => exportCsv(`ldos-${runId}.csv`, ["link", "ldos"], values.map((v, i) => [i, v]), [`Local density of states per link (${unit}), run ${runId}`])}>
          CSV
        </button>
      </div>
    </div>
  );
}

"use client";

import * as d3 from "d3";
import { useMemo, useRef } from "react";
import { num } from "@/lib/units";
import { geometryFromSegments } from "@/lib/lattice";
import { SEQUENTIAL_STOPS } from "@/components/charts/palette";
import { NetworkDrawing } from "@/components/network/NetworkDrawing";
import { shapeOf, linkLengthNm } from "@/components/network/draft";
import { download, exportCsv, exportPng, exportSvg } from "@/lib/exportFigure";
import type { LdosResult, Network } from "@/engine/browser";

const scale = d3.interpolateRgbBasis(SEQUENTIAL_STOPS);

/**
 * The local density of states on every link, drawn on the links of the closed sample the engine
 * used (their positions come with the result), with a colour legend.
 */
export function LdosMap({ result, network, runId }: { result: LdosResult; network?: Network; runId: string }) {
  const values = result.ldosPerMeV.total;
  const l = network ? linkLengthNm(network) : undefined;
  const links = result.links;
  const custom = useMemo(
    () =>
      links ? geometryFromSegments({ fromX: links.fromXNm, fromY: links.fromYNm, toX: links.toXNm, toY: links.toYNm, edge: links.edge }, l ?? 1) : undefined,
    [links, l],
  );
  const shape = useMemo(() => shapeOf(network ?? {}, "K"), [network]);
  const [lo, hi] = useMemo(() => {
    const e = d3.extent(values.filter(Number.isFinite));
    return [e[0] ?? 0, e[1] ?? 1];
  }, [values]);
  const linkValues = useMemo(() => ({ values, color: (v: number) => scale(hi > lo ? (v - lo) / (hi - lo) : 0.5) }), [values, lo, hi]);
  const box = useRef<HTMLDivElement>(null);
  const exportImage = (kind: "svg" | "png") => {
    const svg = box.current?.querySelector("svg[data-renderer]") as SVGSVGElement | null;
    const canvas = box.current?.querySelector("canvas[data-renderer]") as HTMLCanvasElement | null;
    if (svg) return kind === "svg" ? exportSvg(svg, `ldos-${runId}.svg`) : void exportPng(svg, `ldos-${runId}.png`);
    canvas?.toBlob((b) => b && download(`ldos-${runId}.png`, b), "image/png");
  };
  if (!custom) return <p className="text-body text-fg-soft">This result carries no link positions to draw.</p>;
  return (
    <div className="space-y-3">
      <p className="text-body text-fg-soft">
        E = {num(result.energyMeV)} meV · B = {num(result.fieldTesla)} T · broadening {num(result.broadeningMeV)} meV · total {num(result.totalDosPerMeV)}{" "}
        states/meV, both valleys and spins.
      </p>
      <div ref={box}>
        <NetworkDrawing
          shape={shape}
          custom={custom}
          linkNm={l}
          linkValues={linkValues}
          height={480}
          label={`Local density of states on ${values.length} links, colour scale from ${num(lo)} to ${num(hi)} states per meV`}
        />
      </div>
      <div className="flex flex-wrap items-center gap-3" data-testid="ldos-legend">
        <span className="text-caption text-fg-soft">LDOS per link (states / meV)</span>
        <span className="font-mono text-caption tk-num">{num(lo)}</span>
        <span aria-hidden className="h-3 w-48 rounded-sm" style={{ background: `linear-gradient(to right, ${SEQUENTIAL_STOPS.join(",")})` }} />
        <span className="font-mono text-caption tk-num">{num(hi)}</span>
        {custom.linkCount <= 3000 ? (
          <button type="button" className="tk-btn-quiet" onClick={() => exportImage("svg")}>
            SVG
          </button>
        ) : null}
        <button type="button" className="tk-btn-quiet" onClick={() => exportImage("png")}>
          PNG
        </button>
        <button
          type="button"
          className="tk-btn-quiet"
          onClick={() =>
            exportCsv(
              `ldos-${runId}.csv`,
              ["link", "fromXNm", "fromYNm", "toXNm", "toYNm", "ldosPerMeV"],
              values.map((v, i) => [i, links!.fromXNm[i], links!.fromYNm[i], links!.toXNm[i], links!.toYNm[i], v]),
              [`Local density of states per link, calculation ${runId} (model prediction)`],
            )
          }
        >
          CSV
        </button>
      </div>
    </div>
  );
}

"use client";

import { useMemo, useRef, useState } from "react";
import { num } from "@/lib/units";
import { geometryFromSegments } from "@/lib/lattice";
import { chooseColourScale } from "@/components/charts/colorScale";
import { ColourBar, ColourScaleNote, colourFor } from "@/components/charts/ColourBar";
import { usePalette } from "@/components/charts/useWidth";
import { NetworkDrawing } from "@/components/network/NetworkDrawing";
import { shapeOf, linkLengthNm } from "@/components/network/draft";
import { download, exportCsv, exportPng, exportSvg } from "@/lib/exportFigure";
import type { LdosResult, Network } from "@/engine/browser";

const UNIT = "states/meV";

/**
 * The local density of states on every link, drawn on the links of the closed sample the engine
 * used (their positions come with the result), with a colour bar whose ends are labelled and a
 * line saying whether the scale is absolute or relative; a uniform map (spread under 1 %) is
 * drawn on an absolute scale from 0 unless the user stretches it.
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
  const palette = usePalette(true);
  const [relative, setRelative] = useState<boolean | null>(null);
  const scale = useMemo(() => chooseColourScale(values, { relative }), [values, relative]);
  const linkValues = useMemo(() => (scale && palette ? { values, color: colourFor(scale, palette) } : undefined), [values, scale, palette]);
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
        {linkValues ? (
          <NetworkDrawing
            shape={shape}
            custom={custom}
            linkNm={l}
            linkValues={linkValues}
            height={480}
            label={`Local density of states on ${values.length} links, colour scale from ${num(scale?.domain[0])} to ${num(scale?.domain[1])} states per meV`}
          />
        ) : null}
      </div>
      <div className="flex flex-wrap items-center gap-3" data-testid="ldos-legend">
        <span className="text-caption text-fg-soft">LDOS per link (states / meV)</span>
        {scale && palette ? <ColourBar scale={scale} palette={palette} unit={UNIT} id={`ldos-bar-${runId}`} /> : null}
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
      {scale ? <ColourScaleNote scale={scale} unit={UNIT} onToggle={() => setRelative(scale.mode !== "relative")} /> : null}
    </div>
  );
}

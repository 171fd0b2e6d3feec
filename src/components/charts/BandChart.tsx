"use client";

import * as d3 from "d3";
import { useState } from "react";
import type { SpectrumResult } from "@/engine/browser";
import { num } from "@/lib/units";
import { drawFrame, formatTicks, measureTexts, TICK_FONT } from "./axes";
import { D3Chart, useD3Chart } from "./D3Chart";

/** Distance along a path of k points (nm⁻¹): the summed lengths |Δk| of its steps. */
export function pathDistance(k: readonly (readonly [number, number] | number[])[]): number[] {
  const d = [0];
  for (let i = 1; i < k.length; i++) d.push(d[i - 1] + Math.hypot(k[i][0] - k[i - 1][0], k[i][1] - k[i - 1][1]));
  return d;
}

/** The high-symmetry points the engine reports on its path, at their distance along it (nm⁻¹). */
export function zonePoints(labels: SpectrumResult["pathLabels"], distance: number[]): { at: number; label: string }[] {
  return (labels ?? []).map((l) => ({ at: distance[l.index] ?? 0, label: l.label === "Gamma" ? "Γ" : l.label }));
}

type Valleys = "both" | "K" | "K'";

const VALLEY_STYLE = {
  K: { text: "valley K", marker: "filled dots" },
  "K'": { text: "valley K′", marker: "open rings" },
} as const;

/**
 * Band structure along the engine's path: energies (meV, reduced into one period) at each k
 * point against the distance along the path (nm⁻¹), with guide lines at the high-symmetry points;
 * valley K as filled dots and valley K′ as open rings (one colour per valley, named in the
 * legend), either or both shown.
 */
export function BandChart({
  result,
  height = 360,
}: {
  result: Pick<SpectrumResult, "energiesMeV" | "valleyKPrimeEnergiesMeV" | "kPointsPerNm" | "pathLabels" | "energyPeriodMeV">;
  height?: number;
}) {
  const eK = result.energiesMeV;
  const eKp = result.valleyKPrimeEnergiesMeV;
  const distance = result.kPointsPerNm.length === eK.length && eK.length > 0 ? pathDistance(result.kPointsPerNm) : eK.map((_, i) => i);
  const points = zonePoints(result.pathLabels, distance);
  const [valleys, setValleys] = useState<Valleys>(eKp ? "both" : "K");
  const shown = { K: valleys !== "K'", "K'": valleys !== "K" && eKp !== null };
  const chart = useD3Chart(
    height,
    ({ svg, width, height: h, palette, setReadout }) => {
      const dMax = distance[distance.length - 1] || 1;
      const { g, x, y, innerW, innerH } = drawFrame(
        svg,
        width,
        h,
        palette,
        { scale: d3.scaleLinear().domain([0, dMax]), title: "Distance along the path in k-space (nm⁻¹)", unit: "nm⁻¹" },
        { scale: d3.scaleLinear().domain([0, result.energyPeriodMeV]).nice(), title: "Energy (meV)", unit: "meV" },
        { top: 40 },
      );
      // Legend on the first line above the plot, the high-symmetry points on the second.
      const legend = g.append("g").attr("data-layer", "legend").attr("transform", "translate(0,-28)");
      let lx = 0;
      for (const v of ["K", "K'"] as const) {
        if (v === "K'" && !eKp) continue;
        const item = legend
          .append("g")
          .attr("data-legend", v)
          .attr("transform", `translate(${lx},0)`)
          .attr("opacity", shown[v] ? 1 : 0.4);
        marker(item.append("circle").attr("cx", 5).attr("cy", -4), v);
        const label = `${VALLEY_STYLE[v].text} (${VALLEY_STYLE[v].marker})${shown[v] ? "" : ", hidden"}`;
        item.append("text").attr("x", 14).attr("y", 0).attr("font-size", TICK_FONT).attr("fill", palette.fg).text(label);
        lx += 14 + measureTexts(svg, [label], TICK_FONT, false)[0] + 18;
      }
      const guides = g.append("g").attr("data-layer", "zone-points");
      const guide = guides
        .selectAll("g")
        .data(points)
        .join("g")
        .attr("data-point", (p) => p.label)
        .attr("data-k", (p) => p.at);
      guide
        .append("line")
        .attr("x1", (p) => x(p.at))
        .attr("x2", (p) => x(p.at))
        .attr("y1", -4)
        .attr("y2", innerH)
        .attr("stroke", palette.faint)
        .attr("stroke-dasharray", "2 3");
      guide
        .append("text")
        .attr("x", (p) => x(p.at))
        .attr("y", -7)
        .attr("text-anchor", (p) => (x(p.at) < 6 ? "start" : x(p.at) > innerW - 6 ? "end" : "middle"))
        .attr("font-size", 12)
        .attr("font-weight", 600)
        .attr("fill", palette.fg)
        .text((p) => p.label);
      function marker<E extends d3.BaseType, D, P extends d3.BaseType, Q>(c: d3.Selection<E, D, P, Q>, v: "K" | "K'") {
        return v === "K"
          ? c.attr("r", 2).attr("fill", palette.link)
          : c.attr("r", 2.6).attr("fill", "none").attr("stroke", palette.warm).attr("stroke-width", 1.2);
      }
      for (const v of ["K'", "K"] as const) {
        const e = v === "K" ? eK : eKp;
        if (!e || !shown[v]) continue;
        const pts = distance.flatMap((d, i) => (e[i] ?? []).map((E) => [d, E] as [number, number]));
        const layer = g.append("g").attr("data-valley", v);
        marker(
          layer
            .selectAll<SVGCircleElement, [number, number]>("circle")
            .data(pts)
            .join("circle")
            .attr("cx", (p) => x(p[0]))
            .attr("cy", (p) => y(p[1])),
          v,
        );
      }
      g.append("rect")
        .attr("width", innerW)
        .attr("height", innerH)
        .attr("fill", "transparent")
        .on("mousemove", (ev) => {
          const [mx, my] = d3.pointer(ev);
          const i = d3.leastIndex(distance, (d) => Math.abs(x(d) - mx)) ?? 0;
          const E = y.invert(my);
          const parts: string[] = [];
          for (const v of ["K", "K'"] as const) {
            const e = v === "K" ? eK : eKp;
            if (!e || !shown[v]) continue;
            parts.push(`${VALLEY_STYLE[v].text} ${num(d3.least(e[i] ?? [], (w) => Math.abs(w - E)) ?? NaN)} meV`);
          }
          setReadout(`k-path point ${i + 1} of ${distance.length} · ${formatTicks([distance[i]])[0]} nm⁻¹ along the path · ${parts.join(" · ")}`);
        });
    },
    [eK, eKp, valleys, result.energyPeriodMeV, result.kPointsPerNm, result.pathLabels],
  );
  const nb = d3.max(eK, (e) => e.length) ?? 0;
  const nbp = eKp ? (d3.max(eKp, (e) => e.length) ?? 0) : 0;
  const csv = {
    header: [
      "path_index",
      "k_along_path_per_nm",
      "kx_per_nm",
      "ky_per_nm",
      ...Array.from({ length: nb }, (_, b) => `valleyK_band${b}_meV`),
      ...Array.from({ length: nbp }, (_, b) => `valleyKprime_band${b}_meV`),
    ],
    rows: eK.map((e, i) => [i, distance[i], result.kPointsPerNm[i]?.[0], result.kPointsPerNm[i]?.[1], ...e, ...(eKp?.[i] ?? [])]),
    comments: [
      `Band structure along the path, energies reduced into one period of ${num(result.energyPeriodMeV)} meV (model prediction)`,
      ...(points.length ? [`High-symmetry points (nm^-1 along the path): ${points.map((p) => `${p.label} ${p.at}`).join(", ")}`] : []),
    ],
  };
  const options: { v: Valleys; label: string }[] = [
    { v: "both", label: "Both valleys" },
    { v: "K", label: "K" },
    { v: "K'", label: "K′" },
  ];
  return (
    <D3Chart
      chart={chart}
      title="Band structure"
      name="band-structure"
      label="Band structure: energy against the distance along the path in k-space"
      height={height}
      csv={csv}
    >
      <div className="flex flex-wrap items-center gap-2 text-caption text-fg-soft" role="group" aria-label="Valleys shown" data-testid="valley-toggle">
        <span>Valleys shown:</span>
        {options.map((o) => (
          <button
            key={o.v}
            type="button"
            className={valleys === o.v ? "tk-btn" : "tk-btn-quiet"}
            aria-pressed={valleys === o.v}
            disabled={o.v !== "K" && !eKp}
            onClick={() => setValleys(o.v)}
          >
            {o.label}
          </button>
        ))}
        {!eKp ? <span className="text-fg-faint">valley K′ not computed (valley degeneracy 1)</span> : null}
        {points.length === 0 ? <span className="text-fg-faint">custom k points: no high-symmetry points reported</span> : null}
      </div>
    </D3Chart>
  );
}

"use client";

import * as d3 from "d3";
import { num } from "@/lib/units";
import { drawAxes } from "./axes";
import { D3Chart, useD3Chart } from "./D3Chart";

/**
 * Band structure along a path: energies (meV, reduced into one period) at each k point, drawn as
 * dots per band index, with the high-symmetry points as ticks.
 */
export function BandChart({
  energies,
  distance,
  ticks,
  periodMeV,
  height = 340,
}: {
  energies: number[][];
  distance: number[];
  ticks: { at: number; label: string }[];
  periodMeV?: number;
  height?: number;
}) {
  const chart = useD3Chart(
    height,
    ({ g, innerW, innerH, palette, setReadout }) => {
      const x = d3
        .scaleLinear()
        .domain(d3.extent(distance) as [number, number])
        .range([0, innerW]);
      const flat = energies.flat();
      const y = d3
        .scaleLinear()
        .domain(periodMeV ? [0, periodMeV] : (d3.extent(flat) as [number, number]))
        .nice()
        .range([innerH, 0]);
      const xAxis = d3
        .axisBottom(x)
        .tickValues(ticks.map((t) => t.at))
        .tickFormat((_, i) => ticks[i]?.label ?? "");
      drawAxes(g, x, y, innerW, innerH, "Wave vector along the path (nm⁻¹)", "Energy (meV)", palette, xAxis as d3.Axis<d3.NumberValue>);
      g.append("g")
        .selectAll("line")
        .data(ticks)
        .join("line")
        .attr("x1", (t) => x(t.at))
        .attr("x2", (t) => x(t.at))
        .attr("y1", 0)
        .attr("y2", innerH)
        .attr("stroke", palette.grid);
      const nb = d3.max(energies, (e) => e.length) ?? 0;
      for (let b = 0; b < nb; b++) {
        const pts = distance.map((d, i) => [d, energies[i]?.[b]] as [number, number]).filter((p) => p[1] !== undefined);
        g.append("g")
          .attr("data-band", b)
          .selectAll("circle")
          .data(pts)
          .join("circle")
          .attr("cx", (p) => x(p[0]))
          .attr("cy", (p) => y(p[1]))
          .attr("r", 1.8)
          .attr("fill", b % 2 ? palette.linkAlt : palette.link);
      }
      g.append("rect")
        .attr("width", innerW)
        .attr("height", innerH)
        .attr("fill", "transparent")
        .on("mousemove", (ev) => {
          const [mx, my] = d3.pointer(ev);
          const i = d3.leastIndex(distance, (d) => Math.abs(x(d) - mx)) ?? 0;
          const e = y.invert(my);
          const near = d3.least(energies[i] ?? [], (v) => Math.abs(v - e));
          setReadout(`k-path point ${i + 1} of ${distance.length} · E = ${num(near ?? NaN)} meV`);
        });
    },
    [energies, distance, ticks, periodMeV],
  );
  const csv = {
    header: ["pathIndex", "pathDistancePerNm", ...Array.from({ length: d3.max(energies, (e) => e.length) ?? 0 }, (_, b) => `band${b}EnergyMeV`)],
    rows: energies.map((e, i) => [i, distance[i], ...e]),
    comments: ["Band structure along a path (energies reduced into one period)"],
  };
  return (
    <D3Chart
      chart={chart}
      title="Band structure"
      name="band-structure"
      label="Band structure: energy against wave vector along the path"
      height={height}
      csv={csv}
    />
  );
}

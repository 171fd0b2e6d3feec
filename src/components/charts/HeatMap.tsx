"use client";

import * as d3 from "d3";
import { num } from "@/lib/units";
import type { CsvData } from "./ChartFrame";
import { drawAxes } from "./axes";
import { D3Chart, useD3Chart, type Margin } from "./D3Chart";
import { SEQUENTIAL_STOPS } from "./palette";

const tkSequential = d3.interpolateRgbBasis(SEQUENTIAL_STOPS);

const M: Margin = { top: 14, right: 86, bottom: 44, left: 62 };

/**
 * Two-axis sweep as a heat map: rows are the first axis (y), columns the second (x); points not
 * computed yet are plain grey. A colour bar shows the scale of the quantity.
 */
export function HeatMap({
  title,
  name,
  xValues,
  yValues,
  values,
  xLabel,
  yLabel,
  zLabel,
  zUnit = "",
  csv,
  height = 360,
}: {
  title: string;
  name: string;
  xValues: number[];
  yValues: number[];
  values: (number | null)[];
  xLabel: string;
  yLabel: string;
  zLabel: string;
  zUnit?: string;
  csv?: CsvData;
  height?: number;
}) {
  const chart = useD3Chart(
    height,
    ({ svg, g, width, innerW, innerH, palette, setReadout }) => {
      const nx = xValues.length;
      const ny = yValues.length;
      // Cell edges halfway between grid values (uniform or not).
      const edges = (v: number[]) => {
        if (v.length === 1) return [v[0] - 0.5, v[0] + 0.5];
        const e = [v[0] - (v[1] - v[0]) / 2];
        for (let i = 0; i < v.length - 1; i++) e.push((v[i] + v[i + 1]) / 2);
        e.push(v[v.length - 1] + (v[v.length - 1] - v[v.length - 2]) / 2);
        return e;
      };
      const xe = edges(xValues);
      const ye = edges(yValues);
      const x = d3
        .scaleLinear()
        .domain(d3.extent(xe) as [number, number])
        .range([0, innerW]);
      const y = d3
        .scaleLinear()
        .domain(d3.extent(ye) as [number, number])
        .range([innerH, 0]);
      const finite = values.filter((v): v is number => v !== null && Number.isFinite(v));
      const zExt = (finite.length ? d3.extent(finite) : [0, 1]) as [number, number];
      const z = d3.scaleSequential(tkSequential).domain(zExt[0] === zExt[1] ? [zExt[0] - 1, zExt[0] + 1] : zExt);
      const cells: { i: number; j: number; v: number | null }[] = [];
      for (let i = 0; i < ny; i++) for (let j = 0; j < nx; j++) cells.push({ i, j, v: values[i * nx + j] ?? null });
      g.append("g")
        .attr("data-layer", "cells")
        .selectAll("rect")
        .data(cells)
        .join("rect")
        .attr("x", (c) => Math.min(x(xe[c.j]), x(xe[c.j + 1])))
        .attr("width", (c) => Math.abs(x(xe[c.j + 1]) - x(xe[c.j])) + 0.5)
        .attr("y", (c) => Math.min(y(ye[c.i]), y(ye[c.i + 1])))
        .attr("height", (c) => Math.abs(y(ye[c.i + 1]) - y(ye[c.i])) + 0.5)
        .attr("fill", (c) => (c.v === null ? palette.grid : z(c.v)))
        .attr("data-filled", (c) => (c.v === null ? "no" : "yes"))
        .on("mouseenter", (_, c) =>
          setReadout(
            `${xLabel.split(" (")[0]} = ${num(xValues[c.j])} · ${yLabel.split(" (")[0]} = ${num(yValues[c.i])} ` +
              `· ${zLabel} = ${c.v === null ? "not computed yet" : `${num(c.v)}${zUnit ? " " + zUnit : ""}`}`,
          ),
        );
      drawAxes(g, x, y, innerW, innerH, xLabel, yLabel, palette);
      g.select("[data-layer=grid]").remove();
      // Colour bar.
      const barH = innerH;
      const bar = svg
        .append("g")
        .attr("transform", `translate(${width - M.right + 16},${M.top})`)
        .attr("data-layer", "colorbar");
      const id = `hm-grad-${name}`;
      const grad = svg.append("defs").append("linearGradient").attr("id", id).attr("x1", 0).attr("x2", 0).attr("y1", 1).attr("y2", 0);
      d3.range(0, 1.01, 0.1).forEach((t) => grad.append("stop").attr("offset", t).attr("stop-color", tkSequential(t)));
      bar.append("rect").attr("width", 14).attr("height", barH).attr("fill", `url(#${id})`);
      const zs = d3.scaleLinear().domain(z.domain()).range([barH, 0]);
      const za = bar.append("g").attr("transform", "translate(14,0)").call(d3.axisRight(zs).ticks(5));
      za.selectAll("path, line").attr("stroke", palette.faint);
      za.selectAll("text").attr("fill", palette.fg).attr("font-size", 10);
      bar
        .append("text")
        .attr("transform", `translate(62,${barH / 2}) rotate(90)`)
        .attr("text-anchor", "middle")
        .attr("font-size", 11)
        .attr("fill", palette.fg)
        .text(zUnit ? `${zLabel} (${zUnit})` : zLabel);
    },
    [xValues, yValues, values, xLabel, yLabel, zLabel, zUnit, name],
    M,
  );
  return (
    <D3Chart
      chart={chart}
      title={title}
      name={name}
      label={`${title}: ${zLabel} over ${yLabel} and ${xLabel}`}
      height={height}
      csv={csv}
      extra={
        values.some((v) => v === null) ? (
          <span className="flex items-center gap-1.5 text-caption text-fg-faint">
            <span aria-hidden className="inline-block h-3 w-3 rounded-sm" style={{ background: chart.palette?.grid }} />
            not computed yet
          </span>
        ) : null
      }
    />
  );
}

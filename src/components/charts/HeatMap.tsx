"use client";

import * as d3 from "d3";
import { useMemo, useState } from "react";
import { num } from "@/lib/units";
import type { CsvData } from "./ChartFrame";
import { drawFrame } from "./axes";
import { colourBarWidth, colourFor, ColourScaleNote, drawColourBar } from "./ColourBar";
import { chooseColourScale } from "./colorScale";
import { D3Chart, useD3Chart } from "./D3Chart";

/**
 * Two-axis sweep as a heat map: rows are the first axis (y), columns the second (x); points not
 * computed yet are plain grey. A colour bar with labelled ends shows the scale of the quantity,
 * and a line beside it says whether the scale is absolute or relative (with the spread); a
 * uniform map is not stretched unless the user asks.
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
  zRange,
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
  /** The quantity's physical range, for the absolute scale (default: from 0). */
  zRange?: [number, number];
  csv?: CsvData;
  height?: number;
}) {
  const [relative, setRelative] = useState<boolean | null>(null);
  const scale = useMemo(() => chooseColourScale(values, { relative, range: zRange }), [values, relative, zRange]);
  const chart = useD3Chart(
    height,
    ({ svg, width, height: h, palette, setReadout }) => {
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
      const right = scale ? colourBarWidth(svg, scale, zUnit) : 18;
      const { g, x, y, innerH, margin } = drawFrame(
        svg,
        width,
        h,
        palette,
        { scale: d3.scaleLinear().domain(d3.extent(xe) as [number, number]), title: xLabel, tickValues: xValues.length <= 8 ? xValues : undefined },
        { scale: d3.scaleLinear().domain(d3.extent(ye) as [number, number]), title: yLabel, tickValues: yValues.length <= 8 ? yValues : undefined },
        { right, grid: false },
      );
      const colour = scale ? colourFor(scale, palette) : () => palette.grid;
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
        .attr("fill", (c) => (c.v === null ? palette.grid : colour(c.v)))
        .attr("data-filled", (c) => (c.v === null ? "no" : "yes"))
        .on("mouseenter", (_, c) =>
          setReadout(
            `${xLabel.split(" (")[0]} = ${num(xValues[c.j])} · ${yLabel.split(" (")[0]} = ${num(yValues[c.i])} ` +
              `· ${zLabel} = ${c.v === null ? "not computed yet" : `${num(c.v)}${zUnit ? " " + zUnit : ""}`}`,
          ),
        );
      g.selectAll("[data-axis]").raise();
      if (scale) {
        const bar = svg.append("g").attr("transform", `translate(${width - margin.right + 16},${margin.top})`);
        drawColourBar(svg, bar, {
          scale,
          palette,
          length: innerH,
          id: `hm-grad-${name}`,
          unit: zUnit,
          title: zUnit ? `${zLabel} (${zUnit})` : zLabel,
          orientation: "vertical",
        });
      }
    },
    [xValues, yValues, values, xLabel, yLabel, zLabel, zUnit, name, scale],
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
    >
      {scale ? <ColourScaleNote scale={scale} unit={zUnit} onToggle={() => setRelative(scale.mode !== "relative")} /> : null}
    </D3Chart>
  );
}

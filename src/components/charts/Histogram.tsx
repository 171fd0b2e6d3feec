"use client";

import * as d3 from "d3";
import { num } from "@/lib/units";
import { drawFrame } from "./axes";
import { D3Chart, useD3Chart } from "./D3Chart";

/** Histogram of values in [0, 1] by default (transmission eigenvalues), count on the y axis. */
export function Histogram({
  title,
  name,
  values,
  xLabel,
  bins = 20,
  domain = [0, 1],
  height = 260,
}: {
  title: string;
  name: string;
  values: number[];
  xLabel: string;
  bins?: number;
  domain?: [number, number];
  height?: number;
}) {
  const binned = d3
    .bin()
    .domain(domain)
    .thresholds(
      d3
        .range(bins + 1)
        .map((i) => domain[0] + ((domain[1] - domain[0]) * i) / bins)
        .slice(1, -1),
    )(values);
  const chart = useD3Chart(
    height,
    ({ svg, width, height: h, palette, setReadout }) => {
      const { g, x, y, innerH } = drawFrame(
        svg,
        width,
        h,
        palette,
        { scale: d3.scaleLinear().domain(domain), title: xLabel },
        {
          scale: d3
            .scaleLinear()
            .domain([0, d3.max(binned, (b) => b.length) || 1])
            .nice(),
          title: "Count",
        },
      );
      g.append("g")
        .attr("data-layer", "bars")
        .selectAll("rect")
        .data(binned)
        .join("rect")
        .attr("x", (b) => x(b.x0!) + 1)
        .attr("width", (b) => Math.max(0, x(b.x1!) - x(b.x0!) - 2))
        .attr("y", (b) => y(b.length))
        .attr("height", (b) => innerH - y(b.length))
        .attr("fill", palette.link);
      // Hover: each bin's whole column (an empty or short bar is as easy to read as a tall one).
      const read = (b: (typeof binned)[number]) => setReadout(`${num(b.x0!)} – ${num(b.x1!)}: ${b.length} eigenvalue${b.length === 1 ? "" : "s"}`);
      g.append("g")
        .attr("data-layer", "hover")
        .selectAll("rect")
        .data(binned)
        .join("rect")
        .attr("x", (b) => x(b.x0!))
        .attr("width", (b) => Math.max(0, x(b.x1!) - x(b.x0!)))
        .attr("y", 0)
        .attr("height", innerH + 1)
        .attr("fill", "transparent")
        .on("mouseenter", (_, b) => read(b))
        .on("mousemove", (_, b) => read(b));
    },
    [values, bins, xLabel],
  );
  const csv = { header: ["binFrom", "binTo", "count"], rows: binned.map((b) => [b.x0!, b.x1!, b.length]), comments: [`${title}`, `${values.length} values`] };
  return <D3Chart chart={chart} title={title} name={name} label={`${title}: histogram of ${values.length} values`} height={height} csv={csv} />;
}

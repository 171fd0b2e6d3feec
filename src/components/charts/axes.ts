import * as d3 from "d3";
import type { Palette } from "./palette";

export const MARGIN = { top: 14, right: 18, bottom: 44, left: 62 };

/** Draws x and y axes with labels (units in the label), in explicit colours so exports keep them. */
export function drawAxes(
  g: d3.Selection<SVGGElement, unknown, null, undefined>,
  x: d3.AxisScale<d3.NumberValue>,
  y: d3.AxisScale<d3.NumberValue>,
  innerW: number,
  innerH: number,
  xLabel: string,
  yLabel: string,
  p: Palette,
  xAxis?: d3.Axis<d3.NumberValue>,
) {
  const ax = g
    .append("g")
    .attr("transform", `translate(0,${innerH})`)
    .attr("data-axis", "x")
    .call(xAxis ?? d3.axisBottom(x).ticks(Math.max(3, Math.floor(innerW / 80))));
  const ay = g
    .append("g")
    .attr("data-axis", "y")
    .call(d3.axisLeft(y).ticks(Math.max(3, Math.floor(innerH / 50))));
  for (const a of [ax, ay]) {
    a.selectAll("path, line").attr("stroke", p.faint);
    a.selectAll("text").attr("fill", p.fg).attr("font-size", 11).attr("font-family", "var(--font-mono), monospace");
  }
  g.append("g")
    .attr("data-layer", "grid")
    .selectAll("line")
    .data((y as d3.ScaleLinear<number, number>).ticks?.(Math.max(3, Math.floor(innerH / 50))) ?? [])
    .join("line")
    .attr("x1", 0)
    .attr("x2", innerW)
    .attr("y1", (d) => (y as d3.ScaleLinear<number, number>)(d))
    .attr("y2", (d) => (y as d3.ScaleLinear<number, number>)(d))
    .attr("stroke", p.grid)
    .lower();
  g.append("text")
    .attr("x", innerW / 2)
    .attr("y", innerH + 36)
    .attr("text-anchor", "middle")
    .attr("fill", p.fg)
    .attr("font-size", 12)
    .attr("data-label", "x")
    .text(xLabel);
  g.append("text")
    .attr("transform", `translate(${-48},${innerH / 2}) rotate(-90)`)
    .attr("text-anchor", "middle")
    .attr("fill", p.fg)
    .attr("font-size", 12)
    .attr("data-label", "y")
    .text(yLabel);
}

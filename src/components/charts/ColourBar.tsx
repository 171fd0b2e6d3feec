"use client";

import * as d3 from "d3";
import { useEffect, useRef } from "react";
import { num } from "@/lib/units";
import { formatTicks, measureTexts, TICK_FONT, TITLE_FONT } from "./axes";
import { divergingInterpolator, sequentialInterpolator, type ColourScale } from "./colorScale";
import type { Palette } from "./palette";

/** The colour of a value on this scale, in this theme (the sequential map is cut against the theme's backgrounds). */
export function colourFor(scale: ColourScale, palette: Palette): (v: number) => string {
  const interp = scale.kind === "diverging" ? divergingInterpolator : sequentialInterpolator([palette.surface, palette.canvas]);
  return (v: number) => interp(scale.position(v));
}

/** 0.0200 -> 0.02, 2.50·10⁹ -> 2.5·10⁹, 1.000 GΩ -> 1 GΩ. */
const trimZeros = (label: string) => label.replace(/^([−\d]+)\.(\d*?)0+(?=\D|$)/, (_, i: string, f: string) => (f ? `${i}.${f}` : i));

/** Labels of the colour bar: both ends (told apart with enough digits) and round values between them. */
export function colourBarTicks(scale: ColourScale, unit: string): { at: number; label: string; end?: "low" | "high" }[] {
  const [lo, hi] = scale.domain;
  const inner = d3
    .scaleLinear()
    .domain([lo, hi])
    .ticks(4)
    .filter((t) => Math.abs(t - lo) > 0.15 * (hi - lo) && Math.abs(hi - t) > 0.15 * (hi - lo));
  const values = [lo, ...inner, hi];
  // The ends with four significant digits (more when they are close), told apart; the round
  // values between them on their own; no trailing zeros.
  const [low, high] = formatTicks([lo, hi], unit, 4).map(trimZeros);
  const labels = [low, ...formatTicks(inner, unit).map(trimZeros), high];
  return values.map((at, i) => ({ at, label: labels[i], end: i === 0 ? "low" : i === values.length - 1 ? "high" : undefined }));
}

const BAR = 14;

/** Room a vertical colour bar with its labels and title needs to the right of a plot (px). */
export function colourBarWidth(svg: d3.Selection<SVGSVGElement, unknown, null, undefined>, scale: ColourScale, unit: string): number {
  const w = Math.max(
    0,
    ...measureTexts(
      svg,
      colourBarTicks(scale, unit).map((t) => t.label),
      TICK_FONT,
    ),
  );
  return 16 + BAR + 6 + 3 + w + 10 + TITLE_FONT + 4;
}

/**
 * Draws a colour bar into `parent`: the gradient of the scale's colours, ticks at both ends and
 * between them, and (vertical) a title. Vertical bars run from the low end at the bottom;
 * horizontal ones from the low end on the left.
 */
export function drawColourBar(
  svg: d3.Selection<SVGSVGElement, unknown, null, undefined>,
  parent: d3.Selection<SVGGElement, unknown, null, undefined>,
  o: { scale: ColourScale; palette: Palette; length: number; id: string; unit: string; title?: string; orientation: "vertical" | "horizontal" },
) {
  const { scale, palette, length, unit } = o;
  const colour = colourFor(scale, palette);
  const [lo, hi] = scale.domain;
  const vertical = o.orientation === "vertical";
  const grad = svg
    .append("defs")
    .append("linearGradient")
    .attr("id", o.id)
    .attr("x1", 0)
    .attr("y1", vertical ? 1 : 0)
    .attr("x2", vertical ? 0 : 1)
    .attr("y2", 0);
  d3.range(0, 1.0001, 0.05).forEach((t) =>
    grad
      .append("stop")
      .attr("offset", t)
      .attr("stop-color", colour(lo + t * (hi - lo))),
  );
  const bar = parent.append("g").attr("data-layer", "colorbar").attr("data-mode", scale.mode).attr("data-kind", scale.kind);
  bar
    .append("rect")
    .attr("width", vertical ? BAR : length)
    .attr("height", vertical ? length : BAR)
    .attr("fill", `url(#${o.id})`)
    .attr("stroke", palette.faint)
    .attr("stroke-width", 0.5);
  const pos = d3
    .scaleLinear()
    .domain([lo, hi])
    .range(vertical ? [length, 0] : [0, length]);
  let ticks = colourBarTicks(scale, unit);
  if (!vertical) {
    // Horizontal: keep only the labels between the ends that clear their neighbours by 6 px.
    const widths = measureTexts(
      svg,
      ticks.map((d) => d.label),
      TICK_FONT,
    );
    const span = (i: number): [number, number] => {
      const x = pos(ticks[i].at);
      return ticks[i].end === "low" ? [x, x + widths[i]] : ticks[i].end === "high" ? [x - widths[i], x] : [x - widths[i] / 2, x + widths[i] / 2];
    };
    const highSpan = span(ticks.length - 1);
    const kept = [0];
    for (let i = 1; i < ticks.length - 1; i++) {
      const [a, b] = span(i);
      if (a >= span(kept[kept.length - 1])[1] + 6 && b <= highSpan[0] - 6) kept.push(i);
    }
    kept.push(ticks.length - 1);
    ticks = kept.map((i) => ticks[i]);
  }
  const t = bar
    .append("g")
    .selectAll("g")
    .data(ticks)
    .join("g")
    .attr("transform", (d) => (vertical ? `translate(${BAR},${pos(d.at)})` : `translate(${pos(d.at)},${BAR})`));
  t.append("line")
    .attr("x2", vertical ? 6 : 0)
    .attr("y2", vertical ? 0 : 6)
    .attr("stroke", palette.faint);
  t.append("text")
    .attr("x", vertical ? 9 : 0)
    .attr("y", vertical ? 0 : 9)
    .attr("dy", vertical ? "0.32em" : "0.71em")
    .attr("text-anchor", vertical ? "start" : (d) => (d.end === "low" ? "start" : d.end === "high" ? "end" : "middle"))
    .attr("font-size", TICK_FONT)
    .attr("font-family", "var(--font-mono), monospace")
    .attr("fill", palette.fg)
    .attr("data-end", (d) => d.end ?? null)
    .text((d) => d.label);
  if (vertical && o.title) {
    const w = Math.max(
      0,
      ...measureTexts(
        svg,
        ticks.map((d) => d.label),
        TICK_FONT,
      ),
    );
    bar
      .append("text")
      .attr("transform", `translate(${BAR + 9 + w + 10},${length / 2}) rotate(90)`)
      .attr("text-anchor", "middle")
      .attr("font-size", TITLE_FONT)
      .attr("fill", palette.fg)
      .text(o.title);
  }
}

/** A horizontal colour bar on its own (beside a drawing that is not a d3 chart, e.g. the LDOS map). */
export function ColourBar({ scale, palette, unit, id, width = 320 }: { scale: ColourScale; palette: Palette; unit: string; id: string; width?: number }) {
  const ref = useRef<SVGSVGElement>(null);
  useEffect(() => {
    if (!ref.current) return;
    const svg = d3.select(ref.current);
    svg.selectAll("*").remove();
    const labels = colourBarTicks(scale, unit).map((d) => d.label);
    const ends = measureTexts(svg, [labels[0], labels[labels.length - 1]], TICK_FONT);
    // Half a label of room at each end is not needed (end labels are anchored inward), 2 px is.
    const g = svg.append("g").attr("transform", "translate(2,2)");
    drawColourBar(svg, g, { scale, palette, length: Math.max(ends[0] + ends[1] + 40, width - 4), id, unit, orientation: "horizontal" });
  }, [scale, palette, unit, id, width]);
  return <svg ref={ref} width={width} height={BAR + 26} role="img" aria-label={`Colour bar from ${num(scale.domain[0])} to ${num(scale.domain[1])} ${unit}`} />;
}

/**
 * What the colour bar means, in words beside it: absolute (from 0) or relative (the data's min
 * and max) with the spread, whether a uniform map was stretched, and the toggle between the two.
 */
export function ColourScaleNote({ scale, unit, onToggle }: { scale: ColourScale; unit: string; onToggle?: () => void }) {
  const [minL, maxL] = formatTicks([scale.min, scale.max], unit, 4);
  const [lo, hi] = formatTicks(scale.domain, unit, 4);
  const u = unit ? ` ${unit}` : "";
  const spread = `${num(scale.spread * 100, 2)} %`;
  let text: string;
  if (scale.kind === "diverging") text = `Signed values, symmetric about 0: ${lo} to ${hi}${u} (data min ${minL}, max ${maxL}).`;
  else if (scale.mode === "relative" && scale.stretched)
    text = `Stretched: the ${spread} spread (min ${minL}, max ${maxL}${u}) fills the whole colour range, so small differences look large.`;
  else if (scale.mode === "relative") text = `Relative: min ${minL}, max ${maxL}${u} · spread ${spread}.`;
  else if (scale.spread === 0) text = `Absolute: ${lo} to ${hi}${u}. The map is uniform: every value is ${maxL}${u}.`;
  else if (scale.uniform) text = `Absolute: ${lo} to ${hi}${u}. The map is uniform to within ${spread} (min ${minL}, max ${maxL}${u}).`;
  else text = `Absolute: ${lo} to ${hi}${u} (data min ${minL}, max ${maxL} · spread ${spread}).`;
  return (
    <div
      className="flex flex-wrap items-center gap-2 text-caption text-fg-soft"
      data-testid="colour-scale-note"
      data-mode={scale.mode}
      data-uniform={scale.uniform}
    >
      <span className="tk-num">{text}</span>
      {scale.canToggle && onToggle ? (
        <button type="button" className="tk-btn-quiet" onClick={onToggle} data-testid="colour-scale-toggle">
          {scale.mode === "relative" ? "Absolute scale from 0" : scale.uniform ? "Stretch colours over the data" : "Colours over the data range"}
        </button>
      ) : null}
    </div>
  );
}

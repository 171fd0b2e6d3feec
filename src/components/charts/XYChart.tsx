"use client";

import * as d3 from "d3";
import { num } from "@/lib/units";
import type { CsvData } from "./ChartFrame";
import { drawFrame } from "./axes";
import { D3Chart, useD3Chart } from "./D3Chart";

export interface Series {
  name: string;
  x: number[];
  y: (number | null)[];
  /** Half-width of an error band around y (e.g. the ensemble's standard error). */
  err?: (number | null)[];
  color?: "link" | "linkAlt" | "accent" | "warm";
  points?: boolean;
}

interface Props {
  title: string;
  name: string;
  xLabel: string;
  yLabel: string;
  xUnit?: string;
  yUnit?: string;
  series: Series[];
  height?: number;
  csv?: CsvData;
  /** Keep the x domain fixed (e.g. the whole sweep range while points arrive). */
  xDomain?: [number, number];
}

/** Lines (with an optional error band) of y against x, with a hover read-out of the nearest point. */
export function XYChart({ title, name, xLabel, yLabel, xUnit = "", yUnit = "", series, height = 300, csv, xDomain }: Props) {
  const chart = useD3Chart(
    height,
    ({ svg, width, height: h, palette, setReadout }) => {
      const all = series.flatMap((s) => s.x.map((x, i) => ({ x, y: s.y[i], e: s.err?.[i] ?? 0 }))).filter((d) => d.y !== null && Number.isFinite(d.y)) as {
        x: number;
        y: number;
        e: number;
      }[];
      const xs = series.flatMap((s) => s.x);
      const xExt = xDomain ?? (d3.extent(xs) as [number, number]);
      const lo = d3.min(all, (d) => d.y - d.e) ?? 0;
      const hi = d3.max(all, (d) => d.y + d.e) ?? 1;
      const { g, x, y, innerW, innerH } = drawFrame(
        svg,
        width,
        h,
        palette,
        {
          scale: d3.scaleLinear().domain(xExt[0] === undefined ? [0, 1] : xExt[0] === xExt[1] ? [xExt[0] - 1, xExt[0] + 1] : xExt),
          title: xLabel,
          unit: xUnit || undefined,
        },
        {
          scale: d3
            .scaleLinear()
            .domain(lo === hi ? [lo - 1, hi + 1] : [lo, hi])
            .nice(),
          title: yLabel,
          unit: yUnit || undefined,
        },
      );
      series.forEach((s) => {
        const color = palette[s.color ?? "link"];
        const pts = s.x.map((xv, i) => ({ x: xv, y: s.y[i], e: s.err?.[i] ?? null })).filter((d) => d.y !== null && Number.isFinite(d.y)) as {
          x: number;
          y: number;
          e: number | null;
        }[];
        pts.sort((a, b) => a.x - b.x);
        if (s.err && pts.some((p) => p.e !== null)) {
          const area = d3
            .area<{ x: number; y: number; e: number | null }>()
            .x((d) => x(d.x))
            .y0((d) => y(d.y - (d.e ?? 0)))
            .y1((d) => y(d.y + (d.e ?? 0)));
          g.append("path").datum(pts).attr("d", area).attr("fill", color).attr("fill-opacity", 0.2).attr("data-band", s.name);
        }
        g.append("path")
          .datum(pts)
          .attr(
            "d",
            d3
              .line<{ x: number; y: number }>()
              .x((d) => x(d.x))
              .y((d) => y(d.y)),
          )
          .attr("fill", "none")
          .attr("stroke", color)
          .attr("stroke-width", 2)
          .attr("data-series", s.name);
        if (s.points ?? pts.length < 60) {
          g.append("g")
            .attr("data-points", s.name)
            .selectAll("circle")
            .data(pts)
            .join("circle")
            .attr("cx", (d) => x(d.x))
            .attr("cy", (d) => y(d.y))
            .attr("r", 2.8)
            .attr("fill", color);
        }
      });
      if (series.length > 1) {
        const legend = g.append("g").attr("transform", `translate(${innerW - 150}, 4)`);
        series.forEach((s, i) => {
          legend
            .append("rect")
            .attr("x", 0)
            .attr("y", i * 16)
            .attr("width", 12)
            .attr("height", 3)
            .attr("fill", palette[s.color ?? "link"]);
          legend
            .append("text")
            .attr("x", 18)
            .attr("y", i * 16 + 5)
            .attr("font-size", 11)
            .attr("fill", palette.fg)
            .text(s.name);
        });
      }
      const cross = g
        .append("line")
        .attr("y1", 0)
        .attr("y2", innerH)
        .attr("stroke", palette.faint)
        .attr("stroke-dasharray", "3 3")
        .attr("visibility", "hidden");
      g.append("rect")
        .attr("width", innerW)
        .attr("height", innerH)
        .attr("fill", "transparent")
        .on("mousemove", (ev) => {
          const [mx] = d3.pointer(ev);
          const xv = x.invert(mx);
          const parts: string[] = [];
          let snapped: number | null = null;
          for (const s of series) {
            let best = -1;
            let bd = Infinity;
            s.x.forEach((v, i) => {
              if (s.y[i] === null) return;
              const d = Math.abs(v - xv);
              if (d < bd) {
                bd = d;
                best = i;
              }
            });
            if (best < 0) continue;
            snapped = s.x[best];
            const e = s.err?.[best];
            parts.push(`${s.name} ${num(s.y[best] as number)}${e ? ` ± ${num(e, 2)}` : ""}${yUnit ? " " + yUnit : ""}`);
          }
          if (snapped !== null) {
            cross.attr("x1", x(snapped)).attr("x2", x(snapped)).attr("visibility", "visible");
            setReadout(`${xLabel.split(" (")[0]} = ${num(snapped)}${xUnit ? " " + xUnit : ""} · ${parts.join(" · ")}`);
          }
        })
        .on("mouseleave", () => {
          cross.attr("visibility", "hidden");
        });
    },
    [series, xLabel, yLabel, xUnit, yUnit, xDomain],
  );
  return <D3Chart chart={chart} title={title} name={name} label={`${title}: ${yLabel} against ${xLabel}`} height={height} csv={csv} />;
}

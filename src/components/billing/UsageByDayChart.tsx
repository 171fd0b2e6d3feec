"use client";

import * as d3 from "d3";
import { useMemo, useRef } from "react";
import { ChartFrame } from "@/components/charts/ChartFrame";
import { useChartBox } from "@/components/charts/useWidth";
import type { DayUsage } from "@/shared/api";

/** Compute-seconds per day of the period, stacked by member (d3 stack and scales, drawn as SVG). */
export function UsageByDayChart({ period, days, names }: { period: string; days: DayUsage[]; names: Map<string, string> }) {
  const svgRef = useRef<SVGSVGElement>(null);
  const { ref, width, palette } = useChartBox(640);
  const height = 240;
  const m = { top: 12, right: 12, bottom: 28, left: 56 };
  const model = useMemo(() => {
    const [y, mo] = period.split("-").map(Number);
    const dayCount = new Date(Date.UTC(y, mo, 0)).getUTCDate();
    const dates = Array.from({ length: dayCount }, (_, i) => `${period}-${String(i + 1).padStart(2, "0")}`);
    const members = [...new Set(days.map((d) => d.userId ?? "former"))];
    const table = dates.map((date) => {
      const row: Record<string, number | string> = { date };
      for (const k of members) row[k] = 0;
      for (const d of days) if (d.date === date) row[d.userId ?? "former"] = (row[d.userId ?? "former"] as number) + d.computeSeconds;
      return row;
    });
    const series = d3
      .stack<Record<string, number | string>>()
      .keys(members)
      .value((r, k) => Number(r[k]))(table);
    const max = d3.max(series, (s) => d3.max(s, (p) => p[1])) ?? 0;
    return { dates, members, series, max };
  }, [period, days]);
  // The frame pads its figure (p-4 on each side): draw inside that.
  const inner = { w: Math.max(200, width - 34 - m.left - m.right), h: height - m.top - m.bottom };
  const x = d3.scaleBand<string>().domain(model.dates).range([0, inner.w]).padding(0.18);
  const y = d3
    .scaleLinear()
    .domain([0, Math.max(1, model.max)])
    .nice()
    .range([inner.h, 0]);
  const colours = d3
    .scaleOrdinal<string, string>()
    .domain(model.members)
    .range([palette?.link ?? "#1f8f7d", palette?.linkAlt ?? "#d9891a", palette?.accent ?? "#146657", palette?.warm ?? "#9a5b08", "#5b6b75", "#7fcabb"]);
  const csv = {
    header: ["date", "member", "compute_seconds"],
    rows: days.map((d) => [d.date, d.userId ? (names.get(d.userId) ?? d.userId) : "former members", d.computeSeconds]),
    comments: [`Triskel compute use per day and member, period ${period}`],
  };
  return (
    <div ref={ref}>
      <ChartFrame title="Compute use per day" name={`usage-${period}`} svgRef={svgRef} csv={csv}>
        <svg ref={svgRef} width={inner.w + m.left + m.right} height={height} role="img" aria-label={`Compute-seconds per day in ${period}, stacked by member`}>
          <g transform={`translate(${m.left},${m.top})`}>
            {y.ticks(5).map((t) => (
              <g key={t} transform={`translate(0,${y(t)})`}>
                <line x2={inner.w} stroke={palette?.grid ?? "#e4dfd2"} />
                <text x={-6} dy="0.32em" textAnchor="end" fontSize={11} fill={palette?.faint ?? "#5b6b75"}>
                  {d3.format("~s")(t)}
                </text>
              </g>
            ))}
            {model.series.map((s) => (
              <g key={s.key} fill={colours(s.key)} data-member={s.key}>
                {s.map((p, i) => {
                  const h = y(p[0]) - y(p[1]);
                  return h > 0 ? (
                    <rect key={i} x={x(model.dates[i])} y={y(p[1])} width={x.bandwidth()} height={h}>
                      <title>
                        {`${model.dates[i]} · ${s.key === "former" ? "former members" : (names.get(s.key) ?? s.key)}` +
                          `: ${(p[1] - p[0]).toFixed(1)} compute-seconds`}
                      </title>
                    </rect>
                  ) : null;
                })}
              </g>
            ))}
            {model.dates
              .filter((_, i) => i % 5 === 0)
              .map((d) => (
                <text key={d} x={(x(d) ?? 0) + x.bandwidth() / 2} y={inner.h + 18} textAnchor="middle" fontSize={11} fill={palette?.faint ?? "#5b6b75"}>
                  {d.slice(8)}
                </text>
              ))}
            <text transform={`translate(${-44},${inner.h / 2}) rotate(-90)`} textAnchor="middle" fontSize={11} fill={palette?.faint ?? "#5b6b75"}>
              compute-seconds
            </text>
          </g>
        </svg>
        <ul className="mt-2 flex flex-wrap gap-3 text-caption text-fg-soft">
          {model.members.map((k) => (
            <li key={k} className="flex items-center gap-1.5">
              <span aria-hidden className="inline-block h-2.5 w-2.5 rounded-sm" style={{ background: colours(k) }} />
              {k === "former" ? "former members" : (names.get(k) ?? k)}
            </li>
          ))}
        </ul>
      </ChartFrame>
    </div>
  );
}

"use client";

import { useQueries } from "@tanstack/react-query";
import { useMemo, useState } from "react";
import type { DosResult } from "@/engine/browser";
import { api } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { HeatMap } from "@/components/charts/HeatMap";
import { XYChart } from "@/components/charts/XYChart";
import type { SweepDetail } from "@/shared/api";
import { named, quantity, quantityText } from "@/shared/quantities";

/** Points whose full result is read (each is one request); more are listed but not drawn. */
const MAX_POINTS = 60;
/** The line chart's colours: one per curve, so at most this many curves at once. */
const COLOURS = ["link", "warm", "accent", "linkAlt"] as const;

/** "B = 0.1 T, E = 2 meV": a point by its axis values, with units. */
export function pointName(axes: SweepDetail["axes"], coordinates: Record<string, number>): string {
  return axes
    .map((a) => {
      const q = quantity(a.parameter);
      const v = coordinates[a.parameter];
      return `${q.symbol ?? named(q)} = ${v}${q.unit ? ` ${q.unit}` : ""}`;
    })
    .join(", ");
}

const evenly = <T,>(xs: T[], n: number): T[] => (xs.length <= n ? xs : Array.from({ length: n }, (_, i) => xs[Math.round((i * (xs.length - 1)) / (n - 1))]));

/** A DOS scan: DOS(E) of each point (curves with a legend by the axis values) and a heat map over the axis and energy. */
export function DosScan({ s }: { s: SweepDetail }) {
  const succeeded = useMemo(() => s.points.filter((p) => p.status === "succeeded").slice(0, MAX_POINTS), [s.points]);
  const results = useQueries({
    queries: succeeded.map((p) => ({
      queryKey: qk.run(p.runId),
      queryFn: () => api("GET /api/v1/runs/{id}", { params: { id: p.runId } }),
      staleTime: Infinity,
    })),
  });
  const curves: { point: SweepDetail["points"][number]; result: DosResult }[] = [];
  succeeded.forEach((p, i) => {
    const r = results[i]?.data?.result;
    if (r && "kind" in r && r.kind === "dos") curves.push({ point: p, result: r });
  });
  const [a0, a1] = s.axes;
  const [slice, setSlice] = useState(0);
  if (curves.length === 0)
    return (
      <p className="text-body text-fg-soft">{succeeded.length ? "Reading the points' densities of states…" : "DOS curves appear here as points finish."}</p>
    );
  const energies = curves[0].result.energiesMeV;
  const dosKey = "dosPerMeVPerCell.total";
  const dos = quantity(dosKey);
  // Two axes: the heat map is over the first axis and energy at one value of the second.
  const sliceValue = a1 ? a1.values[Math.min(slice, a1.values.length - 1)] : undefined;
  const inSlice = a1 ? curves.filter((c) => c.point.coordinates[a1.parameter] === sliceValue) : curves;
  const drawn = evenly(inSlice, COLOURS.length);
  const rowsByAxis = a0.values.map((v) => inSlice.find((c) => c.point.coordinates[a0.parameter] === v));
  const mapValues = rowsByAxis.flatMap((c) => (c ? energies.map((_, j) => c.result.dosPerMeVPerCell.total[j] ?? null) : energies.map(() => null)));
  const axisColumns = s.axes.map((a) => quantity(a.parameter).column);
  const csv = {
    header: [...axisColumns, quantity("energiesMeV").column, dos.column, quantity("dosPerMeVPerNm2").column, quantity("carrierDensityPerCm2").column],
    rows: curves.flatMap((c) =>
      c.result.energiesMeV.map((e, j) => [
        ...s.axes.map((a) => c.point.coordinates[a.parameter]),
        e,
        c.result.dosPerMeVPerCell.total[j],
        c.result.dosPerMeVPerNm2[j],
        c.result.carrierDensityPerCm2[j],
      ]),
    ),
    comments: [
      `Scan ${s.id}: density of states of ${curves.length} of ${s.pointCount} points; engine ${s.engineVersion ?? "?"}; input hash ${s.inputHash}; model prediction`,
    ],
  };
  return (
    <div className="space-y-5" data-testid="dos-scan" data-curves={curves.length}>
      {a1 ? (
        <label className="block max-w-sm text-caption text-fg-soft">
          {quantityText(a1.parameter)} of the curves and the map
          <select className="tk-field mt-1" value={slice} onChange={(e) => setSlice(Number(e.target.value))}>
            {a1.values.map((v, i) => (
              <option key={v} value={i}>
                {pointName([a1], { [a1.parameter]: v })}
              </option>
            ))}
          </select>
        </label>
      ) : null}
      <XYChart
        title={`Density of states of ${drawn.length === inSlice.length ? "each point" : `${drawn.length} of ${inSlice.length} points, evenly spaced`}`}
        name={`sweep-dos-${s.id}`}
        xLabel={quantityText("energiesMeV")}
        xUnit="meV"
        yLabel={`${dos.label} (${dos.unit})`}
        yUnit={dos.unit}
        series={drawn.map((c, i) => ({
          name: pointName(s.axes, c.point.coordinates),
          x: c.result.energiesMeV,
          y: c.result.dosPerMeVPerCell.total,
          color: COLOURS[i],
        }))}
        csv={csv}
      />
      {a0.values.length > 1 ? (
        <HeatMap
          title={`Density of states over ${quantity(a0.parameter).label.toLowerCase()} and energy${sliceValue !== undefined && a1 ? ` at ${pointName([a1], { [a1.parameter]: sliceValue })}` : ""}`}
          name={`sweep-dos-map-${s.id}`}
          yValues={a0.values}
          xValues={energies}
          values={mapValues}
          yLabel={quantityText(a0.parameter)}
          xLabel={quantityText("energiesMeV")}
          zLabel={dos.label}
          zUnit={dos.unit}
          csv={csv}
        />
      ) : null}
      {s.points.filter((p) => p.status === "succeeded").length > MAX_POINTS ? (
        <p className="text-caption text-fg-faint">The first {MAX_POINTS} computed points are drawn; the results CSV has every point.</p>
      ) : null}
    </div>
  );
}

"use client";

import { useMutation } from "@tanstack/react-query";
import { FLUX_QUANTUM_WB, GRAPHENE_LATTICE_NM } from "@/engine/browser";
import { api } from "@/lib/api";
import type { DatasetPeriod } from "@/shared/api";
import { sigText } from "@/lib/units";
import { XYChart } from "@/components/charts/XYChart";
import { ErrorNote } from "@/components/ui/Page";
import { sig } from "./format";

/** Period analysis: spectrum with its peak, and the period read as area, moiré period and twist angle. */
export function PeriodPanel({ datasetId, onResult }: { datasetId: string; onResult?: (period: DatasetPeriod) => void }) {
  const m = useMutation({
    mutationFn: () => api("POST /api/v1/datasets/{id}/period", { params: { id: datasetId }, json: {} }),
    onSuccess: (period) => onResult?.(period),
  });
  const r = m.data;
  return (
    <section className="space-y-4" aria-labelledby="period-title">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div>
          <h2 id="period-title" className="text-lead font-semibold">
            Period analysis
          </h2>
          <p className="text-caption text-fg-soft">
            Smooth background removed, Hann window, zero-padded Fourier transform of the magnetoconductance; no fit, no compute charged.
          </p>
        </div>
        <button type="button" className="tk-btn" onClick={() => m.mutate()} disabled={m.isPending}>
          {m.isPending ? "Analysing…" : "Estimate the moiré period"}
        </button>
      </div>
      {m.error ? <ErrorNote error={m.error} title="The period analysis failed" /> : null}
      {r ? (
        <div className="grid gap-4 lg:grid-cols-2">
          <XYChart
            title="Spectrum of the oscillations"
            name="period-spectrum"
            xLabel="frequency (1/T)"
            yLabel="amplitude (e²/h)"
            xUnit="1/T"
            yUnit="e²/h"
            series={[
              { name: "spectrum", x: r.spectrum.frequencyPerTesla, y: r.spectrum.amplitude, points: false },
              { name: "peak", x: [r.peak.frequencyPerTesla], y: [r.peak.amplitude], color: "warm", points: true },
            ]}
            csv={{ header: ["frequencyPerTesla", "amplitudeE2h"], rows: r.spectrum.frequencyPerTesla.map((f, i) => [f, r.spectrum.amplitude[i]]) }}
          />
          <div className="tk-card space-y-3" data-testid="period-result">
            <dl className="grid grid-cols-2 gap-x-4 gap-y-1 text-body">
              <dt className="text-fg-soft">field period ΔB</dt>
              <dd className="tk-num font-mono" data-testid="period-tesla">
                {sig(r.periodTesla * 1e3, 5)} mT
              </dd>
              <dt className="text-fg-soft">peak prominence</dt>
              <dd className="tk-num font-mono">{sig(r.peak.prominence, 3)} × median</dd>
              <dt className="text-fg-soft">area h/(e ΔB)</dt>
              <dd className="tk-num font-mono">{sig(r.areaNm2, 5)} nm²</dd>
            </dl>
            <div className="rounded-field border border-accent/40 p-3">
              <p className="text-caption font-semibold text-accent">Reading used: one flux quantum per triangle</p>
              <p className="text-body">
                moiré period{" "}
                <span className="tk-num font-mono" data-testid="period-nm">
                  {sig(r.perTriangle.periodNm, 4)} nm
                </span>{" "}
                · twist angle{" "}
                <span className="tk-num font-mono" data-testid="twist-degrees">
                  {r.perTriangle.twistDegrees === null ? "–" : `${sig(r.perTriangle.twistDegrees, 4)}°`}
                </span>
              </p>
              <p className="mt-1 text-caption text-fg-soft">{r.perTriangle.assumption}</p>
            </div>
            <div className="rounded-field border border-line p-3">
              <p className="text-caption font-semibold">Alternative: one flux quantum per moiré unit cell</p>
              <p className="text-body">
                moiré period <span className="tk-num font-mono">{sig(r.perUnitCell.periodNm, 4)} nm</span> · twist angle{" "}
                <span className="tk-num font-mono">{r.perUnitCell.twistDegrees === null ? "–" : `${sig(r.perUnitCell.twistDegrees, 4)}°`}</span>
              </p>
              <p className="mt-1 text-caption text-fg-soft">{r.perUnitCell.assumption}</p>
            </div>
            <p className="text-caption text-fg-faint">
              l = a / (2 sin(θ/2)) with a = {GRAPHENE_LATTICE_NM} nm; h/e = {sigText(FLUX_QUANTUM_WB, 10)} Wb (exact in the SI, shown to 10 digits).
            </p>
          </div>
        </div>
      ) : null}
    </section>
  );
}

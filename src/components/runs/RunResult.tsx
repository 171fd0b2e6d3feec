"use client";

import Link from "next/link";
import { useMemo } from "react";
import type {
  ComputeInput,
  ComputeResult,
  ConductanceResult as Conductance,
  DosResult as Dos,
  LocalizationResult as Localization,
  SpectrumResult as Spectrum,
} from "@/engine/browser";
import type { RunDetail } from "@/shared/api";
import { ResultWarnings } from "./ResultWarnings";
import { num, withUnit } from "@/lib/units";
import { BandChart } from "@/components/charts/BandChart";
import { Histogram } from "@/components/charts/Histogram";
import { XYChart } from "@/components/charts/XYChart";
import { LdosMap } from "./LdosMap";
import { HallBarView } from "./HallBarView";
import { quantity, quantityText } from "@/shared/quantities";

/** An engine result (every engine result names its kind; a fit's companion row does not). */
export const isEngineResult = (r: RunDetail["result"]): r is ComputeResult => r !== null && "kind" in r;
/** An engine input (a fit's companion row has none). */
export const isEngineInput = (i: RunDetail["input"]): i is ComputeInput => "network" in i && "computation" in i && !("fitId" in i);

/** The middle of each bin of the engine's ensemble histogram (binEdges has one more entry than counts). */
export function binCenters(h: { binEdges: number[]; counts: number[] }): number[] {
  return h.counts.map((_, i) => (h.binEdges[i] + h.binEdges[i + 1]) / 2);
}

/** The result of a run, drawn by kind (the engine's result types); every figure has axes in physical units and exports. */
export function RunResult({ run }: { run: Pick<RunDetail, "id" | "input" | "result"> }) {
  const r = run.result;
  if (r !== null && "fitId" in r) return <FitCompanion fitId={r.fitId} chi2PerDof={r.chi2PerDof ?? null} />;
  if (!isEngineResult(r)) return <pre className="tk-card overflow-auto font-mono text-caption">{JSON.stringify(r, null, 2)}</pre>;
  switch (r.kind) {
    case "conductance":
      return <ConductanceResult r={r} />;
    case "spectrum":
      return <SpectrumResult r={r} />;
    case "dos":
      return <DosResult r={r} />;
    case "ldos":
      return <LdosMap result={r} network={isEngineInput(run.input) ? run.input.network : undefined} runId={run.id} />;
    case "localization":
      return <LocalizationResult r={r} />;
    case "hallBar":
      return <HallBarView r={r} />;
  }
}

/** A fit's companion calculation (the row its compute is metered on): a link back to the fit's report. */
function FitCompanion({ fitId, chi2PerDof }: { fitId: string; chi2PerDof: number | null }) {
  return (
    <div className="tk-card space-y-2" data-testid="fit-companion">
      <p className="text-body">
        This calculation is the compute of a fit: its engine evaluations are metered here, its results are in the fit&apos;s report
        {chi2PerDof !== null ? ` (χ²/dof ${num(chi2PerDof)})` : ""}.
      </p>
      <Link className="tk-btn" href={`/fits/${fitId}`}>
        Open the fit report
      </Link>
    </div>
  );
}

function Figure({ label, value, sub }: { label: string; value: string; sub?: string }) {
  return (
    <div className="rounded-card border border-line bg-surface px-4 py-3">
      <dt className="text-caption text-fg-faint">{label}</dt>
      <dd className="mt-0.5 font-mono text-lead tk-num">{value}</dd>
      {sub ? <dd className="text-caption text-fg-faint">{sub}</dd> : null}
    </div>
  );
}

function ConductanceResult({ r }: { r: Conductance }) {
  const g = r.conductance;
  const ens = r.ensemble;
  const eig = useMemo(() => [...r.transmissionEigenvalues.valleyK, ...(r.transmissionEigenvalues.valleyKPrime ?? [])], [r.transmissionEigenvalues]);
  const histo = ens?.histogram;
  const centers = histo ? binCenters(histo) : [];
  return (
    <div className="space-y-6">
      <dl className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4" data-testid="conductance-figures">
        <Figure label="Total conductance G" value={withUnit(g.total, "e²/h")} sub={`${num(r.siemens)} S`} />
        <Figure label="Resistance" value={withUnit(r.ohms, "Ω")} sub="1 / G, with contacts" />
        <Figure
          label="Valley K, per spin"
          value={withUnit(g.valleyK, "e²/h")}
          sub={g.valleyKPrime !== null && g.valleyKPrime !== undefined ? `valley K′: ${num(g.valleyKPrime)} e²/h` : "one valley"}
        />
        <Figure label="Fano factor F" value={num(r.fano)} sub={`${num(r.channels.total)} lead channels`} />
      </dl>
      {ens ? (
        <dl className="grid gap-3 sm:grid-cols-3">
          <Figure
            label={`Ensemble mean (${ens.samples} seeds)`}
            value={withUnit(ens.mean.total, "e²/h")}
            sub={`standard error ${num(ens.stderr.total)} e²/h`}
          />
          <Figure label="Ensemble standard deviation" value={withUnit(ens.std.total, "e²/h")} />
          <Figure label="Current conservation error" value={num(r.checks.currentConservationError)} sub="|R + T − N|, should be ≤ 1e−10" />
        </dl>
      ) : (
        <p className="text-caption text-fg-faint">Current conservation error |R + T − N| = {num(r.checks.currentConservationError)} (should be ≤ 1e−10).</p>
      )}
      {r.thermal ? (
        <p className="text-caption text-fg-faint" data-testid="thermal-accuracy">
          Thermal average: {r.thermal.energiesPerSample} energies per sample, estimated relative error {num(r.thermal.estimatedRelativeError)} (tolerance{" "}
          {num(r.thermal.relativeTolerance)}).
        </p>
      ) : null}
      <ResultWarnings warnings={r.warnings} />
      <div className="grid gap-6 xl:grid-cols-2">
        {eig.length > 0 ? (
          <Histogram
            title="Transmission eigenvalues"
            name="transmission-eigenvalues"
            values={eig}
            xLabel="Transmission eigenvalue T (dimensionless)"
            bins={20}
          />
        ) : null}
        {histo ? (
          <XYChart
            title="Ensemble distribution of G"
            name="ensemble-histogram"
            xLabel="Conductance G (e²/h)"
            yLabel="Seeds"
            xUnit="e²/h"
            series={[{ name: "count", x: centers, y: histo.counts, points: true }]}
          />
        ) : null}
      </div>
    </div>
  );
}

function SpectrumResult({ r }: { r: Spectrum }) {
  const energies = r.energiesMeV;
  return (
    <div className="space-y-4">
      {/* prettier-ignore */}
      <p className="text-body text-fg-soft">
        Energy period 2πħv/l = <span className="font-mono">{withUnit(r.energyPeriodMeV, "meV")}</span>; energies are reduced into one
        period. {energies.length}{" "}
        k points.
      </p>
      <BandChart result={r} />
    </div>
  );
}

function DosResult({ r }: { r: Dos }) {
  const e = r.energiesMeV;
  const dos = quantity("dosPerMeVPerCell.total");
  const density = quantity("carrierDensityPerCm2");
  const energy = quantityText("energiesMeV");
  return (
    <div className="space-y-4">
      <p className="text-body text-fg-soft" data-testid="dos-facts">
        {r.source === "bloch" ? "From the Bloch spectrum of the periodic network" : "From the finite sample (trace formula)"}; broadening η ={" "}
        <span className="font-mono">{withUnit(r.broadeningMeV, "meV")}</span>; energy period{" "}
        <span className="font-mono">{withUnit(r.energyPeriodMeV, "meV")}</span>; moiré cell area{" "}
        <span className="font-mono">{withUnit(r.cellAreaNm2, "nm²")}</span>; carrier density counted from{" "}
        <span className="font-mono">{withUnit(r.carrierDensityFromMeV, "meV")}</span>; states per cell per period{" "}
        <span className="font-mono">{num(r.checks.statesPerCellPerPeriod)}</span>.
      </p>
      <div className="grid gap-6 xl:grid-cols-2">
        <XYChart
          title="Density of states"
          name="density-of-states"
          xLabel={energy}
          xUnit="meV"
          yLabel={`${dos.label} (${dos.unit})`}
          yUnit={dos.unit}
          series={[{ name: "DOS", x: e, y: r.dosPerMeVPerCell.total }]}
          csv={{
            header: [quantity("energiesMeV").column, dos.column, quantity("dosPerMeVPerNm2").column, density.column],
            rows: e.map((x, i) => [x, r.dosPerMeVPerCell.total[i], r.dosPerMeVPerNm2[i], r.carrierDensityPerCm2[i]]),
            comments: ["Density of states and carrier density; model prediction"],
          }}
        />
        {r.carrierDensityPerCm2.length ? (
          <XYChart
            title="Carrier density"
            name="carrier-density"
            xLabel={energy}
            xUnit="meV"
            yLabel={quantityText("carrierDensityPerCm2")}
            yUnit={density.unit}
            series={[{ name: "n", x: e, y: r.carrierDensityPerCm2, color: "warm" }]}
          />
        ) : null}
      </div>
    </div>
  );
}

function LocalizationResult({ r }: { r: Localization }) {
  const L = r.lengthsNm;
  const mK = r.meanLnT.valleyK;
  const seK = r.stderrLnT.valleyK;
  const mKp = r.meanLnT.valleyKPrime;
  const xi = r.localizationLength.valleyK;
  const lambda = r.lambda.valleyK;
  const series: { name: string; x: number[]; y: number[]; err?: number[]; color?: "warm" }[] = [
    { name: "valley K", x: L, y: mK, err: seK.length ? seK : undefined },
  ];
  if (mKp?.length) series.push({ name: "valley K′", x: L, y: mKp, err: r.stderrLnT.valleyKPrime ?? undefined, color: "warm" });
  return (
    <div className="space-y-6">
      <dl className="grid gap-3 sm:grid-cols-3">
        <Figure
          label="Localization length ξ (valley K)"
          value={xi ? withUnit(xi.nm, "nm") : "not localized on these lengths"}
          sub={xi ? `${num(xi.inLinkLengths)} link lengths${xi.stderrNm ? ` · ± ${num(xi.stderrNm, 2)} nm` : ""}` : "ln T does not decrease"}
        />
        <Figure label="Λ = ξ / W" value={num(lambda)} sub="small: localized; order 1 or more: extended on this width" />
        <Figure label="Strip width W" value={withUnit(r.widthNm, "nm")} sub={`${r.rows} rows · ${r.samples} seeds · fit from ${num(r.fitFromNm)} nm`} />
      </dl>
      {L.length && mK.length ? (
        <XYChart
          title="⟨ln T⟩ along the strip"
          name="localization"
          xLabel="Strip length L (nm)"
          xUnit="nm"
          yLabel="⟨ln T⟩ (dimensionless)"
          series={series}
          csv={{
            header: [quantity("lengthsNm").column, quantity("meanLnT.valleyK").column, quantity("stderrLnT.valleyK").column],
            rows: L.map((x, i) => [x, mK[i], seK[i]]),
            comments: ["Mean ln T over the ensemble against strip length (model prediction)"],
          }}
        />
      ) : null}
    </div>
  );
}

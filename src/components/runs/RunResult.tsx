"use client";

import { useMemo } from "react";
import { CONDUCTANCE_QUANTUM_S } from "@/engine/browser";
import { num, withUnit } from "@/lib/units";
import { BandChart } from "@/components/charts/BandChart";
import { Histogram } from "@/components/charts/Histogram";
import { XYChart } from "@/components/charts/XYChart";
import { LdosMap } from "./LdosMap";

type R = Record<string, any>;
const isNum = (x: unknown): x is number => typeof x === "number" && Number.isFinite(x);
const arr = (x: unknown): number[] => (Array.isArray(x) ? x.filter(isNum) : []);

/** The result of a run, drawn by kind; every figure has axes in physical units and exports. */
export function RunResult({ kind, result, input, runId }: { kind: string; result: R; input?: R; runId: string }) {
  if (kind === "conductance") return <ConductanceResult r={result} />;
  if (kind === "spectrum") return <SpectrumResult r={result} />;
  if (kind === "dos") return <DosResult r={result} />;
  if (kind === "ldos") return <LdosMap result={result} network={input?.network} runId={runId} />;
  if (kind === "localization") return <LocalizationResult r={result} />;
  return <pre className="tk-card overflow-auto font-mono text-caption">{JSON.stringify(result, null, 2)}</pre>;
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

function ConductanceResult({ r }: { r: R }) {
  const g = r.conductance ?? {};
  const ens = r.ensemble;
  const eig = useMemo(() => {
    const t = r.transmissionEigenvalues;
    if (Array.isArray(t)) return t.flat(3).filter(isNum);
    if (t && typeof t === "object") return Object.values(t).flat(3).filter(isNum) as number[];
    return [] as number[];
  }, [r.transmissionEigenvalues]);
  const siemens = isNum(r.siemens) ? r.siemens : isNum(r.siemens?.total) ? r.siemens.total : isNum(g.total) ? g.total * CONDUCTANCE_QUANTUM_S : null;
  const ohms = isNum(r.ohms) ? r.ohms : isNum(r.ohms?.total) ? r.ohms.total : null;
  const histo = ens?.histogram;
  return (
    <div className="space-y-6">
      <dl className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4" data-testid="conductance-figures">
        <Figure label="Total conductance G" value={withUnit(g.total, "e²/h")} sub={siemens !== null ? `${num(siemens)} S` : undefined} />
        <Figure label="Resistance" value={withUnit(ohms, "Ω")} sub="1 / G, with contacts" />
        <Figure label="Valley K, per spin" value={withUnit(g.valleyK, "e²/h")} sub={g.valleyKPrime !== null && g.valleyKPrime !== undefined ? `valley K′: ${num(g.valleyKPrime)} e²/h` : "one valley"} />
        <Figure label="Fano factor F" value={num(isNum(r.fano) ? r.fano : r.fano?.total)} sub={`${num(r.channels?.total ?? r.channels?.left ?? r.channels)} lead channels`} />
      </dl>
      {ens ? (
        <dl className="grid gap-3 sm:grid-cols-3">
          <Figure label={`Ensemble mean (${ens.samples} seeds)`} value={withUnit(ens.mean?.total, "e²/h")} sub={`standard error ${num(ens.stderr?.total)} e²/h`} />
          <Figure label="Ensemble standard deviation" value={withUnit(ens.std?.total, "e²/h")} />
          <Figure label="Current conservation error" value={num(r.checks?.currentConservationError)} sub="|R + T − N|, should be ≤ 1e−10" />
        </dl>
      ) : (
        <p className="text-caption text-fg-faint">Current conservation error |R + T − N| = {num(r.checks?.currentConservationError)} (should be ≤ 1e−10).</p>
      )}
      {r.thermal ? (
        <p className="text-caption text-fg-faint" data-testid="thermal-accuracy">
          Thermal average: {r.thermal.energiesPerSample} energies per sample, estimated relative error {num(r.thermal.estimatedRelativeError)} (tolerance {num(r.thermal.relativeTolerance)}).
        </p>
      ) : null}
      {Array.isArray(r.warnings) && r.warnings.length > 0 ? (
        <ul role="alert" className="tk-card space-y-1 text-caption" data-testid="result-warnings">
          {r.warnings.map((w: string, i: number) => (
            <li key={i}>Warning: {w}</li>
          ))}
        </ul>
      ) : null}
      <div className="grid gap-6 xl:grid-cols-2">
        {eig.length > 0 ? <Histogram title="Transmission eigenvalues" name="transmission-eigenvalues" values={eig} xLabel="Transmission eigenvalue T (dimensionless)" bins={20} /> : null}
        {histo && Array.isArray(histo.counts) ? (
          <XYChart
            title="Ensemble distribution of G"
            name="ensemble-histogram"
            xLabel="Conductance G (e²/h)"
            yLabel="Seeds"
            xUnit="e²/h"
            series={[{ name: "count", x: arr(histo.centers ?? histo.binCenters ?? histo.edges?.slice(0, -1)), y: arr(histo.counts), points: true }]}
          />
        ) : null}
      </div>
    </div>
  );
}

/** Distance along the path from the k points (1/nm), when the result gives them. */
function pathDistance(k: number[][]): number[] {
  const d = [0];
  for (let i = 1; i < k.length; i++) d.push(d[i - 1] + Math.hypot(k[i][0] - k[i - 1][0], k[i][1] - k[i - 1][1]));
  return d;
}

function SpectrumResult({ r }: { r: R }) {
  const energies: number[][] = Array.isArray(r.energiesMeV) ? r.energiesMeV : [];
  const k: number[][] = r.kPointsPerNm ?? r.kPoints ?? r.path?.kPointsPerNm ?? [];
  const distance: number[] = r.path?.distancePerNm ?? (k.length === energies.length && k.length > 0 ? pathDistance(k) : energies.map((_, i) => i));
  const labels: { index: number; label: string }[] = r.path?.labels ?? r.pathLabels ?? [];
  const greek = (x: string) => (x === "Gamma" ? "Γ" : x);
  const ticks = labels.length ? labels.map((l) => ({ at: distance[l.index] ?? 0, label: greek(l.label) })) : [{ at: distance[0] ?? 0, label: "start" }, { at: distance[distance.length - 1] ?? 1, label: "end" }];
  return (
    <div className="space-y-4">
      <p className="text-body text-fg-soft">
        Energy period 2πħv/l = <span className="font-mono">{withUnit(r.energyPeriodMeV, "meV")}</span>; energies are reduced into one period. {energies.length} k points.
      </p>
      <BandChart energies={energies} distance={distance} ticks={ticks} periodMeV={r.energyPeriodMeV} />
      {Array.isArray(r.valleyKPrimeEnergiesMeV) ? <p className="text-caption text-fg-faint">Valley K′ energies are in the result JSON (valleyKPrimeEnergiesMeV); the plot shows valley K.</p> : null}
    </div>
  );
}

function DosResult({ r }: { r: R }) {
  const e = arr(r.energiesMeV ?? r.energyMeV ?? r.energies);
  const pick = (v: unknown) => (Array.isArray(v) ? arr(v) : v && typeof v === "object" ? arr((v as R).total) : []);
  const perCell = pick(r.dosPerMeVPerCell ?? r.dosPerCellPerMeV);
  const perArea = pick(r.dosPerMeVPerNm2 ?? r.dosPerNm2PerMeV);
  const n = arr(r.carrierDensityPerCm2 ?? r.carrierDensity?.perCm2 ?? r.carrierDensityCm2);
  const nNm = arr(r.carrierDensityPerNm2 ?? r.carrierDensity?.perNm2);
  const density = n.length ? { y: n, label: "Carrier density n (cm⁻²)", unit: "cm⁻²" } : { y: nNm, label: "Carrier density n (nm⁻²)", unit: "nm⁻²" };
  const dos = perCell.length ? { y: perCell, label: "DOS (states / meV / moiré cell)", unit: "1/meV/cell" } : { y: perArea, label: "DOS (states / meV / nm²)", unit: "1/meV/nm²" };
  return (
    <div className="grid gap-6 xl:grid-cols-2">
      <XYChart
        title="Density of states"
        name="density-of-states"
        xLabel="Energy E (meV)"
        xUnit="meV"
        yLabel={dos.label}
        yUnit={dos.unit}
        series={[{ name: "DOS", x: e, y: dos.y }]}
        csv={{ header: ["energyMeV", dos.unit === "1/meV/cell" ? "dosPerCellPerMeV" : "dosPerNm2PerMeV", density.unit === "cm⁻²" ? "carrierDensityPerCm2" : "carrierDensityPerNm2"], rows: e.map((x, i) => [x, dos.y[i], density.y[i]]), comments: ["Density of states and carrier density (model prediction)"] }}
      />
      {density.y.length ? <XYChart title="Carrier density" name="carrier-density" xLabel="Energy E (meV)" xUnit="meV" yLabel={density.label} yUnit={density.unit} series={[{ name: "n", x: e, y: density.y, color: "warm" }]} /> : null}
    </div>
  );
}

function LocalizationResult({ r }: { r: R }) {
  const L = arr(r.lengthsNm);
  const mK = arr(r.meanLnT?.valleyK);
  const seK = arr(r.stderrLnT?.valleyK);
  const mKp = arr(r.meanLnT?.valleyKPrime);
  const xi = r.localizationLength?.valleyK as { nm: number; inLinkLengths: number; stderrNm: number | null } | null;
  const lambda = r.lambda?.valleyK;
  const series = [{ name: "valley K", x: L, y: mK, err: seK.length ? seK : undefined }];
  if (mKp.length) series.push({ name: "valley K′", x: L, y: mKp, err: arr(r.stderrLnT?.valleyKPrime), color: "warm" } as never);
  return (
    <div className="space-y-6">
      <dl className="grid gap-3 sm:grid-cols-3">
        <Figure label="Localization length ξ (valley K)" value={xi ? withUnit(xi.nm, "nm") : "not localized on these lengths"} sub={xi ? `${num(xi.inLinkLengths)} link lengths${xi.stderrNm ? ` · ± ${num(xi.stderrNm, 2)} nm` : ""}` : "ln T does not decrease"} />
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
          csv={{ header: ["lengthNm", "meanLnTValleyK", "stderrLnTValleyK"], rows: L.map((x, i) => [x, mK[i], seK[i]]), comments: ["Mean ln T over the ensemble against strip length (model prediction)"] }}
        />
      ) : null}
    </div>
  );
}

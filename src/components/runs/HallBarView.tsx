"use client";

import type { HallBarResult } from "@/engine/browser";
import { RESISTANCE_QUANTUM_OHM } from "@/engine/browser";
import { ResultWarnings } from "./ResultWarnings";
import { num, withUnit } from "@/lib/units";

const EDGE_WORDS: Record<HallBarResult["terminals"][number]["edge"], string> = {
  left: "left face (lead)",
  right: "right face (lead)",
  top: "top edge",
  bottom: "bottom edge",
};

/** A resistance in ohms and in units of h/e² (the resistance quantum). */
function ohms(x: number | null): { value: string; sub: string } {
  if (x === null) return { value: "–", sub: "undetermined" };
  return { value: withUnit(x, "Ω", 6), sub: `${num(x / RESISTANCE_QUANTUM_OHM, 6)} h/e²` };
}

/** A Hall bar calculation: the four-terminal resistances, the terminals with their windows and channels, the conductance matrix and its checks. */
export function HallBarView({ r }: { r: HallBarResult }) {
  const rs = r.resistances;
  const names = r.conductanceMatrix.terminals;
  const figures: [string, number | null, string][] = [
    ["Longitudinal resistance R_xx", rs.longitudinalOhms, "(V_top1 − V_top2) / I, current source → drain"],
    ["Hall resistance R_xy", rs.hallOhms, "(V_top1 − V_bottom1) / I"],
    ["Two-terminal resistance", rs.twoTerminalOhms, `(V_source − V_drain) / I + ${num(r.contactOhms)} Ω contacts`],
  ];
  return (
    <div className="space-y-6" data-testid="hall-bar-result">
      <dl className="grid gap-3 sm:grid-cols-3" data-testid="hall-bar-resistances">
        {figures.map(([label, x, how]) => {
          const f = ohms(x);
          return (
            <div key={label} className="rounded-card border border-line bg-surface px-4 py-3">
              <dt className="text-caption text-fg-faint">{label}</dt>
              <dd className="mt-0.5 font-mono text-lead tk-num">{f.value}</dd>
              <dd className="text-caption text-fg-faint">
                {f.sub} · {how}
              </dd>
            </div>
          );
        })}
      </dl>
      {r.ensemble ? (
        <p className="text-caption text-fg-soft" data-testid="hall-bar-ensemble">
          Ensemble of {r.ensemble.samples} disorder seeds: R_xx {withUnit(r.ensemble.mean.longitudinalOhms, "Ω")} ± {num(r.ensemble.stderr.longitudinalOhms)} Ω,
          R_xy {withUnit(r.ensemble.mean.hallOhms, "Ω")} ± {num(r.ensemble.stderr.hallOhms)} Ω (mean ± standard error of the per-seed values; the figures above
          are of the mean conductance matrix).
        </p>
      ) : null}
      {r.fourTerminalOhms.length > 0 ? (
        <section className="tk-card" aria-labelledby="hall-measurements">
          <h3 id="hall-measurements" className="text-body font-semibold">
            Requested four-terminal resistances
          </h3>
          <table className="mt-2 font-mono text-caption">
            <thead className="text-left text-fg-faint">
              <tr>
                <th className="pr-4">current (from → to)</th>
                <th className="pr-4">voltage (V₁ − V₂)</th>
                <th>resistance</th>
              </tr>
            </thead>
            <tbody>
              {r.fourTerminalOhms.map((m, i) => (
                <tr key={i} className="border-t border-line">
                  <td className="pr-4">
                    {m.current[0]} → {m.current[1]}
                  </td>
                  <td className="pr-4">
                    {m.voltage[0]} − {m.voltage[1]}
                  </td>
                  <td className="tk-num">{withUnit(m.ohms, "Ω", 6)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>
      ) : null}
      <section className="tk-card" aria-labelledby="hall-terminals">
        <h3 id="hall-terminals" className="text-body font-semibold">
          Terminals
        </h3>
        <table className="mt-2 font-mono text-caption" data-testid="hall-bar-terminals">
          <thead className="text-left text-fg-faint">
            <tr>
              <th className="pr-4">terminal</th>
              <th className="pr-4">where</th>
              <th className="pr-4">columns</th>
              <th className="pr-4">channels in / out, valley K</th>
              <th>valley K′</th>
            </tr>
          </thead>
          <tbody>
            {r.terminals.map((t) => (
              <tr key={t.name} className="border-t border-line" data-terminal={t.name}>
                <td className="pr-4">{t.name}</td>
                <td className="pr-4">{EDGE_WORDS[t.edge]}</td>
                <td className="pr-4">{t.fromColumn === null ? "–" : t.fromColumn === t.toColumn ? t.fromColumn : `${t.fromColumn}–${t.toColumn}`}</td>
                <td className="pr-4 tk-num">
                  {t.channels.valleyK.in} / {t.channels.valleyK.out}
                </td>
                <td className="tk-num">{t.channels.valleyKPrime ? `${t.channels.valleyKPrime.in} / ${t.channels.valleyKPrime.out}` : "–"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>
      <section className="tk-card" aria-labelledby="hall-matrix">
        <h3 id="hall-matrix" className="text-body font-semibold">
          Conductance matrix G (e²/h, both valleys and spin)
        </h3>
        <p className="text-caption text-fg-soft">I_i = (e²/h) Σ_j G_ij V_j; G_ii = N_i − R_ii, G_ij = −T_ij. Rows and columns sum to zero.</p>
        <table className="mt-2 font-mono text-caption" data-testid="hall-bar-matrix">
          <thead>
            <tr>
              <th />
              {names.map((n) => (
                <th key={n} className="px-2 text-left text-fg-faint">
                  {n}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {r.conductanceMatrix.values.map((row, i) => (
              <tr key={names[i]}>
                <th className="pr-2 text-left text-fg-faint">{names[i]}</th>
                {row.map((v, j) => (
                  <td key={j} className="px-2 tk-num">
                    {num(v, 5)}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
        <p className="mt-2 text-caption text-fg-faint" data-testid="hall-bar-checks">
          Checks: largest row sum {num(r.checks.rowSumError)} e²/h, column sum {num(r.checks.columnSumError)} e²/h, unitarity {num(r.checks.unitarityError)}{" "}
          (each should be ≤ 1e−10).
        </p>
      </section>
      {r.thermal ? (
        <p className="text-caption text-fg-faint">
          Thermal average: {r.thermal.energiesPerSample} energies per sample, estimated relative error {num(r.thermal.estimatedRelativeError)}.
        </p>
      ) : null}
      <ResultWarnings warnings={r.warnings} />
      <p className="text-caption text-fg-faint">Model predictions of the network model, not measurements.</p>
    </div>
  );
}

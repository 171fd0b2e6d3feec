"use client";

import { useQueryClient } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useMemo, useState, type DragEvent } from "react";
import { api, ApiClientError } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { XYChart } from "@/components/charts/XYChart";
import { Field } from "@/components/ui/Field";
import { PageHeader } from "@/components/ui/Page";
import { RefusalNote, usePermission } from "@/components/ui/Permission";
import {
  assumeXUnit,
  assumeYUnit,
  DATASET_MAX_BYTES,
  DatasetCsvError,
  parseDatasetCsv,
  previewCsv,
  proposeMapping,
  Y_MEASURES_INFO,
  type ColumnMapping,
  type CsvIssue,
  type YMeasures,
} from "@/shared/csv";
import { X_UNIT_INFO, X_UNITS, Y_UNIT_INFO, Y_UNITS, type XUnit, type YUnit } from "@/shared/units";

type Preview = ReturnType<typeof previewCsv>;

function IssueList({ issues }: { issues: CsvIssue[] }) {
  return (
    <ul role="alert" className="space-y-1 rounded-card border border-danger/40 bg-danger-soft p-3 text-caption text-danger" data-testid="csv-issues">
      {issues.map((i, k) => (
        <li key={k}>
          <span className="font-mono">
            {i.row !== null ? `row ${i.row}` : "file"}
            {i.column ? ` · ${i.column}` : ""}
          </span>{" "}
          — {i.message}
        </li>
      ))}
    </ul>
  );
}

/** What the form assumed about the units of the chosen columns, and whether the choice now agrees with the column names. */
function UnitsAssumed({ mapping }: { mapping: ColumnMapping }) {
  const x = assumeXUnit(mapping.xColumn);
  const y = assumeYUnit(mapping.yColumn);
  const line = (a: typeof x | typeof y, chosen: string, axis: "x" | "y") =>
    a.source === "column name" && a.unit !== chosen
      ? `${axis} in ${chosen}: chosen by you; the column name "${a.column}" says ${a.unit}.`
      : a.unit !== chosen
        ? `${axis} in ${chosen}: chosen by you (the column name "${a.column}" states no unit).`
        : a.note;
  return (
    <ul className="space-y-0.5 rounded-field border border-line bg-surface-sunk p-3 text-caption" data-testid="units-assumed" aria-label="Units assumed">
      <li data-axis="x" data-source={x.source}>
        {line(x, mapping.xUnit, "x")}
      </li>
      <li data-axis="y" data-source={y.source}>
        {line(y, mapping.yUnit, "y")}
        {mapping.sigmaColumn ? ` The uncertainty column "${mapping.sigmaColumn}" is read in the same unit.` : ""}
      </li>
    </ul>
  );
}

/** Upload: drop a CSV, map its columns and units, see the converted curve, then store it. */
export function DatasetUpload() {
  const router = useRouter();
  const queryClient = useQueryClient();
  const permission = usePermission("work.create");
  const [file, setFile] = useState<File | null>(null);
  const [text, setText] = useState<string | null>(null);
  const [preview, setPreview] = useState<Preview | null>(null);
  const [readIssues, setReadIssues] = useState<CsvIssue[] | null>(null);
  const [name, setName] = useState("");
  const [mapping, setMapping] = useState<ColumnMapping | null>(null);
  const [dragging, setDragging] = useState(false);
  const [submitError, setSubmitError] = useState<{ message: string; issues: CsvIssue[] } | null>(null);
  const [busy, setBusy] = useState(false);

  async function take(f: File) {
    setSubmitError(null);
    setFile(f);
    if (f.size > DATASET_MAX_BYTES) {
      setReadIssues([
        { code: "too_many_rows", row: null, column: null, message: `The file is ${f.size} bytes; the limit is ${DATASET_MAX_BYTES} bytes (5 MB).` },
      ]);
      setPreview(null);
      return;
    }
    const t = await f.text();
    setText(t);
    if (!name) setName(f.name.replace(/\.[^.]+$/, ""));
    try {
      const p = previewCsv(t);
      setPreview(p);
      setReadIssues(null);
      setMapping(proposeMapping(p.columns).mapping);
    } catch (e) {
      setPreview(null);
      setReadIssues(e instanceof DatasetCsvError ? e.issues : [{ code: "malformed_row", row: null, column: null, message: (e as Error).message }]);
    }
  }

  const parsed = useMemo(() => {
    if (!text || !mapping) return null;
    try {
      return { ok: true as const, data: parseDatasetCsv(text, mapping) };
    } catch (e) {
      return {
        ok: false as const,
        issues: e instanceof DatasetCsvError ? e.issues : [{ code: "malformed_row" as const, row: null, column: null, message: (e as Error).message }],
      };
    }
  }, [text, mapping]);

  async function submit() {
    if (!file || !mapping) return;
    setBusy(true);
    setSubmitError(null);
    const form = new FormData();
    form.set("file", file);
    form.set("name", name.trim());
    form.set("xColumn", mapping.xColumn);
    form.set("xUnit", mapping.xUnit);
    form.set("yColumn", mapping.yColumn);
    form.set("yUnit", mapping.yUnit);
    if (mapping.sigmaColumn) form.set("sigmaColumn", mapping.sigmaColumn);
    if (mapping.yMeasures) form.set("yMeasures", mapping.yMeasures);
    if (mapping.temperatureColumn) form.set("temperatureColumn", mapping.temperatureColumn);
    try {
      const body = await api("POST /api/v1/datasets", { form });
      await queryClient.invalidateQueries({ queryKey: qk.datasets });
      router.push(`/datasets/${body.id}`);
    } catch (e) {
      const details = e instanceof ApiClientError ? (e.details as { issues?: CsvIssue[] } | undefined) : undefined;
      setSubmitError({ message: (e as Error).message, issues: details?.issues?.filter((i) => "row" in i) ?? [] });
      setBusy(false);
    }
  }

  const set = (patch: Partial<ColumnMapping>) => setMapping((m) => (m ? { ...m, ...patch } : m));
  const columns = preview?.columns ?? [];
  const onDrop = (e: DragEvent) => {
    e.preventDefault();
    setDragging(false);
    const f = e.dataTransfer.files?.[0];
    if (f) void take(f);
  };

  return (
    <>
      <PageHeader kicker="datasets" title="Upload a measured curve">
        A CSV with a header line: one column for x (field, gate voltage or density), one for the conductance or resistance, optionally its uncertainty and the
        temperature. Lines starting with # are comments. Files up to 5 MB.
      </PageHeader>
      <div className="space-y-6">
        <label
          htmlFor="dataset-file"
          data-testid="drop-zone"
          onDragOver={(e) => {
            e.preventDefault();
            setDragging(true);
          }}
          onDragLeave={() => setDragging(false)}
          onDrop={onDrop}
          className={
            `flex cursor-pointer flex-col items-center justify-center rounded-card border-2 border-dashed p-10 text-center ` +
            `${dragging ? "border-accent bg-accent-soft" : "border-line-strong"}`
          }
        >
          <span className="text-lead font-semibold">{file ? file.name : "Drop a CSV file here"}</span>
          <span className="mt-1 text-caption text-fg-soft">
            {file ? `${file.size.toLocaleString()} bytes · ${preview?.totalRows ?? "?"} rows` : "or click to choose one"}
          </span>
          <input
            id="dataset-file"
            type="file"
            accept=".csv,text/csv,text/plain"
            className="sr-only"
            onChange={(e) => e.target.files?.[0] && void take(e.target.files[0])}
          />
        </label>
        {readIssues ? <IssueList issues={readIssues} /> : null}

        {preview && mapping ? (
          <section className="tk-card space-y-4" aria-labelledby="mapping-title">
            <h2 id="mapping-title" className="text-body font-semibold">
              Column mapping
            </h2>
            <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
              <Field id="dataset-name" label="Name">
                <input id="dataset-name" className="tk-field" value={name} onChange={(e) => setName(e.target.value)} />
              </Field>
              <Field id="x-column" label="x column">
                <select id="x-column" className="tk-field" value={mapping.xColumn} onChange={(e) => set({ xColumn: e.target.value })}>
                  {columns.map((c) => (
                    <option key={c}>{c}</option>
                  ))}
                </select>
              </Field>
              <Field id="x-unit" label="x unit" hint={X_UNIT_INFO[mapping.xUnit].label}>
                <select id="x-unit" className="tk-field" value={mapping.xUnit} onChange={(e) => set({ xUnit: e.target.value as XUnit })}>
                  {X_UNITS.map((u) => (
                    <option key={u}>{u}</option>
                  ))}
                </select>
              </Field>
              <Field id="y-column" label="y column">
                <select id="y-column" className="tk-field" value={mapping.yColumn} onChange={(e) => set({ yColumn: e.target.value })}>
                  {columns.map((c) => (
                    <option key={c}>{c}</option>
                  ))}
                </select>
              </Field>
              <Field id="y-measures" label="y measures" hint={Y_MEASURES_INFO[mapping.yMeasures ?? "twoTerminal"].label}>
                <select
                  id="y-measures"
                  className="tk-field"
                  value={mapping.yMeasures ?? "twoTerminal"}
                  onChange={(e) => set({ yMeasures: e.target.value === "twoTerminal" ? undefined : (e.target.value as YMeasures) })}
                >
                  <option value="twoTerminal">two-terminal conductance or resistance</option>
                  <option value="longitudinal">R_xx of a Hall bar</option>
                  <option value="hall">R_xy of a Hall bar</option>
                </select>
              </Field>
              <Field
                id="y-unit"
                label="y unit"
                hint={`${Y_UNIT_INFO[mapping.yUnit].label}; ${mapping.yMeasures && mapping.yMeasures !== "twoTerminal" ? "stored in Ω as measured" : "stored as conductance in e²/h"}`}
              >
                <select id="y-unit" className="tk-field" value={mapping.yUnit} onChange={(e) => set({ yUnit: e.target.value as YUnit })}>
                  {Y_UNITS.map((u) => (
                    <option key={u}>{u}</option>
                  ))}
                </select>
              </Field>
              <Field id="sigma-column" label="uncertainty column (optional)" hint="same unit as y">
                <select
                  id="sigma-column"
                  className="tk-field"
                  value={mapping.sigmaColumn ?? ""}
                  onChange={(e) => set({ sigmaColumn: e.target.value || undefined })}
                >
                  <option value="">none</option>
                  {columns.map((c) => (
                    <option key={c}>{c}</option>
                  ))}
                </select>
              </Field>
              <Field id="temperature-column" label="temperature column (optional)" hint="kelvin">
                <select
                  id="temperature-column"
                  className="tk-field"
                  value={mapping.temperatureColumn ?? ""}
                  onChange={(e) => set({ temperatureColumn: e.target.value || undefined })}
                >
                  <option value="">none</option>
                  {columns.map((c) => (
                    <option key={c}>{c}</option>
                  ))}
                </select>
              </Field>
            </div>
            <UnitsAssumed mapping={mapping} />
            <div className="overflow-x-auto">
              <table className="font-mono text-caption" data-testid="csv-preview">
                <thead>
                  <tr>
                    {columns.map((c) => (
                      <th key={c} className="px-2 py-1 text-left text-fg-faint">
                        {c}
                      </th>
                    ))}
                  </tr>
                </thead>
                <tbody>
                  {preview.rows.map((r, i) => (
                    <tr key={i} className="border-t border-line">
                      {columns.map((_, j) => (
                        <td key={j} className="px-2 py-0.5">
                          {r[j]}
                        </td>
                      ))}
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </section>
        ) : null}

        {parsed && !parsed.ok ? <IssueList issues={parsed.issues} /> : null}
        {parsed && parsed.ok ? (
          <XYChart
            title="Preview in engine units"
            name="dataset-preview"
            xLabel={`${parsed.data.xQuantity} (${parsed.data.xCanonicalUnit})`}
            yLabel={
              parsed.data.mapping.yMeasures && parsed.data.mapping.yMeasures !== "twoTerminal"
                ? `${Y_MEASURES_INFO[parsed.data.mapping.yMeasures].short} (Ω)`
                : "conductance (e²/h)"
            }
            xUnit={parsed.data.xCanonicalUnit}
            yUnit={parsed.data.mapping.yMeasures && parsed.data.mapping.yMeasures !== "twoTerminal" ? "Ω" : "e²/h"}
            series={[{ name: "data", x: parsed.data.x, y: parsed.data.y, err: parsed.data.sigma ?? undefined, points: true }]}
          />
        ) : null}
        {submitError ? (
          <div className="space-y-2">
            <p role="alert" className="text-body text-danger">
              {submitError.message}
            </p>
            {submitError.issues.length ? <IssueList issues={submitError.issues} /> : null}
          </div>
        ) : null}
        {permission.reason ? <RefusalNote id="dataset-refusal" reason={permission.reason} /> : null}
        <div className="flex items-center gap-3">
          <button
            type="button"
            className="tk-btn"
            disabled={!permission.allowed || !parsed?.ok || !name.trim() || busy}
            aria-describedby={permission.reason ? "dataset-refusal" : undefined}
            onClick={() => void submit()}
          >
            {busy ? "Saving…" : "Save dataset"}
          </button>
          {parsed?.ok ? (
            <span className="text-caption text-fg-soft">
              {parsed.data.rows} points{parsed.data.xDescending ? " (x ran downwards; stored ascending)" : ""}
            </span>
          ) : null}
        </div>
      </div>
    </>
  );
}

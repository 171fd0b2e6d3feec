import { readFileSync, readdirSync } from "node:fs";
import { join } from "node:path";
import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { compute, parseComputeInput, SWEEPABLE_PARAMETERS, type ComputeInput } from "@/engine";
import type { SweepDetail } from "@/shared/api";
import { citation, MODEL_CAUTION, sweepColumns, sweepCsv } from "@/shared/exports";
import { inputRows } from "@/shared/inputs";
import { scanName, scanTitle } from "@/shared/kinds";
import { QUANTITIES, UNITS, messageInWords, quantity, quantityText, reasonPattern } from "@/shared/quantities";
import { triangularNetwork } from "@/shared/networks";
import { scalarQuantities } from "@/shared/sweep-axes";

const FIXTURES = join(import.meta.dirname, "..", "..", "fixtures");
const SUFFIXES = new Set<string>(Object.values(UNITS));
/** A column is snake_case words and a unit suffix from the table (the rule of docs/api.md). */
const hasUnitSuffix = (c: string) => [...SUFFIXES].some((s) => c.endsWith(`_${s}`) && /^[a-z0-9_]+$/.test(c.slice(0, -s.length - 1)));

/** Real results of every kind: the fixtures the command line tests use, plus a Hall bar with an ensemble. */
function everyKindsResult(): { kind: string; result: unknown; input: ComputeInput }[] {
  const inputs = readdirSync(FIXTURES)
    .filter((f) => f.endsWith(".json") && !f.startsWith("invalid") && f !== "expected.json")
    .map((f) => parseComputeInput(JSON.parse(readFileSync(join(FIXTURES, f), "utf8"))));
  const bar = triangularNetwork(
    { columns: 8, rows: 6 },
    { forward: 0.5, left: 0.3, right: 0.2 },
    { transverse: "open", disorder: { linkPhaseWidthRad: 1, seed: 3 } },
  );
  inputs.push(
    parseComputeInput({ network: bar, computation: { kind: "hallBar", energyMeV: 0.7, fieldTesla: 0.3, temperatureK: 0.5, ensemble: { samples: 2 } } }),
  );
  return inputs.map((input) => ({ kind: input.computation.kind, result: compute(input), input }));
}

describe("the quantity table covers every key a result, an input or a scan axis can carry", () => {
  const results = everyKindsResult();

  it("every scalar leaf of every kind's result is named in the table (no raw key reaches a page or a CSV)", () => {
    expect(new Set(results.map((r) => r.kind))).toEqual(new Set(["conductance", "spectrum", "dos", "ldos", "localization", "hallBar"]));
    const missing = results.flatMap((r) =>
      Object.keys(scalarQuantities(r.result))
        .filter((k) => !QUANTITIES[k])
        .map((k) => `${r.kind}: ${k}`),
    );
    expect(missing).toEqual([]);
  });

  it("every input field of those calculations and every sweepable parameter is named", () => {
    const missing = results.flatMap((r) =>
      inputRows(r.input)
        .filter((row) => !QUANTITIES[row.key])
        .map((row) => `${r.kind}: ${row.part}.${row.key}`),
    );
    expect(missing).toEqual([]);
    expect(SWEEPABLE_PARAMETERS.map((p) => p.name).filter((n) => !QUANTITIES[n])).toEqual([]);
  });

  it("the table's units agree with the engine's for every sweepable parameter", () => {
    const engineUnit: Record<string, string> = { ohm: "Ω", degree: "°", "1": "" };
    for (const p of SWEEPABLE_PARAMETERS) {
      const ours = quantity(p.name).unit;
      if (p.name.startsWith("size.")) expect(ours).toBe(p.name.slice(5));
      else expect(ours).toBe(engineUnit[p.unit] ?? p.unit);
    }
  });

  it("labels are words, not keys, and every column name ends in its unit", () => {
    for (const [key, q] of Object.entries(QUANTITIES)) {
      expect(q.label, key).not.toMatch(/[a-z][A-Z][a-z]|MeV|Nm2|Tesla|Ohms/);
      expect(hasUnitSuffix(q.column), `${key}: ${q.column}`).toBe(true);
    }
    expect(quantity("fieldTesla").column).toBe("field_T");
    expect(quantity("energyMeV").column).toBe("energy_meV");
    expect(quantity("conductance.total").column).toBe("conductance_e2h");
    expect(quantity("siemens").column).toBe("conductance_S");
    expect(quantity("ohms").column).toBe("resistance_ohm");
    expect(quantity("temperatureK").column).toBe("temperature_K");
    expect(quantity("dosPerMeVPerNm2").column).toBe("dos_per_meV_nm2");
    expect(quantityText("broadeningMeV")).toBe("Broadening η (meV)");
    expect(quantityText("cellAreaNm2")).toBe("Moiré cell area (nm²)");
  });

  it("a key the table does not know is still put in words", () => {
    expect(quantity("someNewFigureMeV").label).toBe("Some new figure me v");
    expect(quantity("someNewFigureMeV").column).toBe("some_new_figure_me_v_1");
  });
});

describe("messages in words", () => {
  it("names the field of an engine message and the field names inside it; reasons at different values group together", () => {
    const a = messageInWords("computation.fieldTesla: a torus holds whole flux quanta: fieldTesla must be a multiple of 0.012 T here (got 0.013 T)");
    expect(a).toBe("Magnetic field B (T): a torus holds whole flux quanta: magnetic field B must be a multiple of 0.012 T here (got 0.013 T)");
    const b = messageInWords("computation.fieldTesla: a torus holds whole flux quanta: fieldTesla must be a multiple of 0.012 T here (got 0.029 T)");
    expect(reasonPattern(a)).toBe(reasonPattern(b));
    expect(reasonPattern(a)).not.toBe(reasonPattern(messageInWords("network.node.forward: out of range")));
    expect(messageInWords("no field here")).toBe("no field here");
  });
});

describe("scan names in words", () => {
  it("titles name the kind and each axis with its unit; a name its author gave is kept", () => {
    expect(scanTitle("conductance", ["fieldTesla", "energyMeV"])).toBe("Conductance versus magnetic field (T) and energy (meV)");
    expect(scanTitle("dos", ["node.forward"])).toBe("Density of states versus forward probability");
    expect(scanName("conductance versus fieldTesla and energyMeV", ["fieldTesla", "energyMeV"])).toBe("Conductance versus magnetic field (T) and energy (meV)");
    expect(scanName("My field scan", ["fieldTesla"])).toBe("My field scan");
    expect(scanName(null, ["fieldTesla"], "ldos")).toBe("Local density of states versus magnetic field (T)");
  });
});

function sweepOf(): Parameters<typeof sweepCsv>[0] {
  const network = triangularNetwork({ columns: 4, rows: 4 }, { forward: 0.5, left: 0.25, right: 0.25 });
  const input = parseComputeInput({ network, computation: { kind: "conductance", energyMeV: 0.5, temperatureK: 0 } });
  const axes = [{ parameter: "fieldTesla", values: [0, 0.1, 0.2] }];
  const points: SweepDetail["points"] = axes[0].values.map((b, i) => {
    const failed = i === 2;
    const result = failed ? null : compute(parseComputeInput({ network, computation: { ...input.computation, fieldTesla: b } }));
    return {
      index: i,
      coordinates: { fieldTesla: b },
      runId: `00000000-0000-4000-8000-00000000000${i}`,
      status: failed ? "failed" : "succeeded",
      progress: 1,
      computeSeconds: failed ? null : 0.01,
      quantities: result ? scalarQuantities(result) : null,
      error: failed ? { code: "invalid_input", message: "field step, too large\non a torus" } : null,
    };
  });
  return {
    id: "11111111-1111-4111-8111-111111111111",
    name: "conductance versus fieldTesla",
    axes,
    points,
    input,
    networkId: "22222222-2222-4222-8222-222222222222",
    networkName: "Clean 0.11° network (synthetic)",
    networkVersion: 3,
    engineVersion: "2.1.0",
    inputHash: "ab".repeat(32),
    status: "failed",
    counts: { queued: 0, running: 0, succeeded: 2, failed: 1, cancelled: 0 },
    pointCount: 3,
    ensemble: null,
  };
}

describe("a scan's results CSV", () => {
  const s = sweepOf();
  const body = sweepCsv(s, { engineVersion: "2.1.0", exportedAt: new Date("2026-12-04T01:02:03Z"), url: "https://triskel.example/sweeps/x" });
  const lines = body.trim().split("\n");
  const comments = lines.filter((l) => l.startsWith("#")).join("\n");
  const parsed = Papa.parse<Record<string, string>>(body, { header: true, comments: "#", skipEmptyLines: true });

  it("header lines: the inputs with units, the network, engine version, input hash, export time and the caution", () => {
    expect(comments).toContain("# Triskel scan 11111111-1111-4111-8111-111111111111: Conductance versus magnetic field (T)");
    expect(comments).toContain("# url: https://triskel.example/sweeps/x");
    expect(comments).toContain("# axis 1: Magnetic field B (T): 3 values from 0 T to 0.2 T");
    expect(comments).toContain("# network: Clean 0.11° network (synthetic) (id 22222222-2222-4222-8222-222222222222, version 3)");
    expect(comments).toMatch(/# fixed inputs: Energy E = 0\.5 meV; Temperature T = 0 K; .*Twist angle θ = 0\.11 °/);
    expect(comments).not.toMatch(/fixed inputs:.*Magnetic field/);
    expect(comments).toContain(`# engine version: 2.1.0; input hash (sha256): ${"ab".repeat(32)}`);
    expect(comments).toContain("# exported: 2026-12-04T01:02:03.000Z");
    expect(comments).toContain("2 of 3 succeeded, 1 failed, 0 cancelled");
    expect(comments).toContain(`# ${MODEL_CAUTION}`);
  });

  it("every column is named once, every numeric column ends in its unit, the axis is not repeated", () => {
    const header = parsed.meta.fields ?? [];
    expect(new Set(header).size).toBe(header.length);
    expect(header.slice(0, 5)).toEqual(["point_index", "field_T", "status", "run_id", "compute_s"]);
    const identifiers = new Set(["point_index", "status", "run_id", "error"]);
    expect(header.filter((c) => !identifiers.has(c) && !hasUnitSuffix(c))).toEqual([]);
    expect(header).toEqual(expect.arrayContaining(["conductance_e2h", "conductance_S", "resistance_ohm", "energy_meV", "temperature_K", "fano_factor_1"]));
    expect(header.filter((c) => c.startsWith("field_T"))).toEqual(["field_T"]);
    expect(sweepColumns(s).map((c) => c.name)).toEqual(header);
  });

  it("one row per point; a failed point has empty quantities and its reason on one line", () => {
    expect(parsed.errors).toEqual([]);
    expect(parsed.data).toHaveLength(3);
    expect(parsed.data.map((r) => Number(r.field_T))).toEqual([0, 0.1, 0.2]);
    expect(Number(parsed.data[1].conductance_e2h)).toBeCloseTo(s.points[1].quantities!["conductance.total"], 12);
    expect(parsed.data[2].status).toBe("failed");
    expect(parsed.data[2].conductance_e2h).toBe("");
    expect(parsed.data[2].error).toBe("field step, too large on a torus");
  });
});

describe("the citation of a result", () => {
  it("names the title, group, UTC date, URL, engine version, input hash and the caution", () => {
    const text = citation({
      title: "Conductance",
      group: "Larkspur Devices Lab",
      date: "2026-12-04T01:02:03.000Z",
      url: "https://triskel.example/runs/1",
      engineVersion: "2.1.0",
      inputHash: "cd".repeat(32),
    });
    expect(text.split("\n")).toEqual([
      "Conductance. Larkspur Devices Lab, Triskel, 2026-12-04 (UTC).",
      "https://triskel.example/runs/1",
      `Engine version 2.1.0; input hash (sha256) ${"cd".repeat(32)}.`,
      MODEL_CAUTION,
    ]);
  });
});

// Units proposed from column names on the upload form (src/shared/csv.ts: columnNameUnit,
// assumeXUnit, assumeYUnit, proposeMapping): "G_S", "G (uS)", "R_kohm", "B (mT)" are read from the
// name, a name without a unit falls back to a stated default, and the bracket form stays binding.
import { describe, expect, it } from "vitest";
import { assumeXUnit, assumeYUnit, columnNameUnit, DatasetCsvError, parseDatasetCsv, previewCsv, proposeMapping } from "@/shared/csv";

describe("units from column names", () => {
  it("reads brackets, underscores and a trailing word", () => {
    expect(columnNameUnit("G_S")).toBe("S");
    expect(columnNameUnit("G (uS)")).toBe("uS");
    expect(columnNameUnit("G [µS]")).toBe("uS");
    expect(columnNameUnit("R_kohm")).toBe("kohm");
    expect(columnNameUnit("R_ohm")).toBe("ohm");
    expect(columnNameUnit("B (mT)")).toBe("mT");
    expect(columnNameUnit("B_T")).toBe("T");
    expect(columnNameUnit("B mT")).toBe("mT");
    expect(columnNameUnit("G_e2/h")).toBe("e2/h");
    expect(columnNameUnit("Vg_V")).toBe("V");
    // no unit, or a word that is not one of ours
    expect(columnNameUnit("G")).toBeUndefined();
    expect(columnNameUnit("T_K")).toBeUndefined();
    expect(columnNameUnit("conductance")).toBeUndefined();
  });

  it("says where each proposed unit came from", () => {
    expect(assumeYUnit("G_S")).toMatchObject({ unit: "S", source: "column name" });
    expect(assumeYUnit("G_S").note).toMatch(/S: read from the column name "G_S"/);
    expect(assumeYUnit("G")).toMatchObject({ unit: "e2/h", source: "default" });
    expect(assumeYUnit("G").note).toMatch(/states no unit/);
    // a resistance by name, without a unit: ohm, said to be assumed
    expect(assumeYUnit("R")).toMatchObject({ unit: "ohm", source: "default" });
    expect(assumeYUnit("R_kohm")).toMatchObject({ unit: "kohm", source: "column name" });
    expect(assumeXUnit("B (mT)")).toMatchObject({ unit: "mT", source: "column name" });
    expect(assumeXUnit("field")).toMatchObject({ unit: "T", source: "default" });
  });

  it("proposes a mapping: x, y, uncertainty and temperature columns with their units", () => {
    const p = proposeMapping(["B_T", "G_S", "dG_S", "T_K"]);
    expect(p.mapping).toEqual({ xColumn: "B_T", xUnit: "T", yColumn: "G_S", yUnit: "S", sigmaColumn: "dG_S", temperatureColumn: "T_K" });
    expect(p.y.source).toBe("column name");
    // the y unit of a column named G_S is never the e2/h default
    expect(proposeMapping(["B", "G_S"]).mapping.yUnit).toBe("S");
    expect(proposeMapping(["B (mT)", "R_kohm"]).mapping).toEqual({ xColumn: "B (mT)", xUnit: "mT", yColumn: "R_kohm", yUnit: "kohm" });
    expect(proposeMapping(["G (uS)", "B (mT)"]).mapping).toMatchObject({ xColumn: "B (mT)", yColumn: "G (uS)", yUnit: "uS" });
    // nothing in the names: the first two columns, defaults stated
    const d = proposeMapping(["x", "y"]);
    expect(d.mapping).toEqual({ xColumn: "x", xUnit: "T", yColumn: "y", yUnit: "e2/h" });
    expect([d.x.source, d.y.source]).toEqual(["default", "default"]);
  });

  it("the preview's guessed units use the same reading", () => {
    expect(previewCsv("B_mT,G_S,R (kohm)\n1,2,3\n2,3,4\n").guessedUnits).toEqual({ B_mT: "mT", G_S: "S", "R (kohm)": "kohm" });
  });

  it("a proposed mapping parses the file it was proposed for; only a bracketed unit is binding", () => {
    const text = "B (mT),G_S\n0,1e-4\n10,1.1e-4\n20,1.2e-4\n30,1.3e-4\n";
    const { mapping } = proposeMapping(previewCsv(text).columns);
    const parsed = parseDatasetCsv(text, mapping);
    expect(parsed.x[1]).toBeCloseTo(0.01, 12);
    expect(parsed.y[0]).toBeCloseTo(1e-4 / 3.874045865e-5, 9);
    // "G_S" mapped as e2/h is the user's choice (accepted); "B (mT)" mapped as T is refused
    expect(() => parseDatasetCsv(text, { ...mapping, yUnit: "e2/h" })).not.toThrow();
    expect(() => parseDatasetCsv(text, { ...mapping, xUnit: "T" })).toThrow(DatasetCsvError);
  });
});

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { DatasetCsvError, parseDatasetCsv, previewCsv, type ColumnMapping } from "@/shared/csv";
import { CONDUCTANCE_QUANTUM_S } from "@/engine/constants";
import { convertY, Y_UNIT_INFO } from "@/shared/units";
import { csvText } from "../../support/csv";

const fieldMap: ColumnMapping = { xColumn: "B", xUnit: "T", yColumn: "G", yUnit: "e2/h" };

function issuesOf(text: string, mapping: ColumnMapping = fieldMap) {
  try {
    parseDatasetCsv(text, mapping);
  } catch (e) {
    expect(e).toBeInstanceOf(DatasetCsvError);
    return (e as DatasetCsvError).issues;
  }
  throw new Error("expected the CSV to be rejected");
}

describe("units", () => {
  it("uses the exact SI constants (CODATA 2018 / SI 2019)", () => {
    // e^2/h = 3.874045865e-5 S (physics.md section 4), the engine's constant.
    expect(Y_UNIT_INFO["e2/h"].toSi).toBe(CONDUCTANCE_QUANTUM_S);
    expect(convertY(3.874045865e-5, "S")!.g).toBeCloseTo(1, 9);
    expect(convertY(25812.80745, "ohm")!.g).toBeCloseTo(1, 9);
  });
  it("converts resistances into conductance and propagates the uncertainty", () => {
    const r = convertY(25.81280745, "kohm", 0.1)!; // one resistance quantum
    expect(r.g).toBeCloseTo(1, 9);
    // sigma_G = sigma_R / R^2 in SI, then in units of e^2/h
    expect(r.sigma!).toBeCloseTo(100 / 25812.80745 ** 2 / CONDUCTANCE_QUANTUM_S, 12);
    expect(convertY(38.74045865, "uS")!.g).toBeCloseTo(1, 9);
    expect(convertY(0, "ohm")).toBeNull();
  });
});

describe("parseDatasetCsv", () => {
  it("a quote that never closes is named on the file line where it opens, after comments and the header", () => {
    for (const [text, line] of [
      ['B,G\n"0.1,2\n0.2,3\n', 2],
      ['# synthetic\nB,G\n0.1,2\n"0.2,3\n0.3,4\n', 4],
      ['B,G\n0.1,2\n0.2,"3\n0.3,4', 3],
    ] as const) {
      const err = (() => {
        try {
          parseDatasetCsv(text, fieldMap);
        } catch (e) {
          return e;
        }
      })();
      expect(err).toBeInstanceOf(DatasetCsvError);
      expect((err as DatasetCsvError).issues).toEqual([expect.objectContaining({ code: "malformed_row", row: line, column: null })]);
      expect((err as DatasetCsvError).issues[0].message).toMatch(new RegExp(`^Row ${line}: a quote`));
    }
  });
  it("a closed quoted cell holding a line break keeps the line numbers of the rows after it", () => {
    const err = (() => {
      try {
        parseDatasetCsv('B,G\n"0.1\n",2\nx,3\n', fieldMap);
      } catch (e) {
        return e;
      }
    })();
    expect((err as DatasetCsvError).issues.map((i) => i.row)).toContain(4);
  });
  it("parses, converts mT to T, skips comments, keeps file line numbers, sorts a descending sweep", () => {
    const text = "# synthetic\nB (mT),R (kohm),dR (kohm)\n30,12.9064037,0.01\n20,25.81280745,0.02\n10,25.81280745,0.02\n0,12.9064037,0.01\n";
    const d = parseDatasetCsv(text, { xColumn: "B (mT)", xUnit: "mT", yColumn: "R (kohm)", yUnit: "kohm", sigmaColumn: "dR (kohm)" });
    expect(d.x).toEqual([0, 0.01, 0.02, 0.03]);
    expect(d.y[0]).toBeCloseTo(2, 7);
    expect(d.y[1]).toBeCloseTo(1, 7);
    expect(d.xDescending).toBe(true);
    expect(d.sigma![0]).toBeCloseTo(10 / 12906.4037 ** 2 / CONDUCTANCE_QUANTUM_S, 9);
    expect(d.xQuantity).toBe("field");
  });

  it("accepts semicolons, tabs and a unit suffix in the cells that matches the mapping", () => {
    const d = parseDatasetCsv("B;G\n0.1 T;2\n0.2 T;2.1\n0.3 T;2.2\n0.4 T;2.3\n", fieldMap);
    expect(d.rows).toBe(4);
    const t = parseDatasetCsv("B\tG\tT_K\n1\t2\t0.3\n2\t2\t0.3\n3\t2\t0.3\n4\t2\t0.3\n", { ...fieldMap, temperatureColumn: "T_K" });
    expect(t.temperatureK).toEqual([0.3, 0.3, 0.3, 0.3]);
  });

  it("names row and column for a non-numeric value", () => {
    const [i] = issuesOf("B,G\n0,1\n0.1,1\n0.2,abc\n0.3,1\n");
    expect(i).toMatchObject({ code: "non_numeric", row: 4, column: "G" });
    expect(i.message).toContain('Row 4, column "G"');
  });

  it("names the header row and lists the columns for a missing column", () => {
    const [i] = issuesOf("# lab notebook\nfield,cond\n0,1\n");
    expect(i).toMatchObject({ code: "missing_column", row: 2, column: "B" });
    expect(i.message).toContain('"field", "cond"');
  });

  it("reports unsorted and duplicated x on their rows", () => {
    expect(issuesOf("B,G\n0,1\n0.1,1\n0.1,1\n0.3,1\n")[0]).toMatchObject({ code: "duplicate_x", row: 4, column: "B" });
    expect(issuesOf("B,G\n0,1\n0.2,1\n0.1,1\n0.3,1\n")[0]).toMatchObject({ code: "unsorted_x", row: 4, column: "B" });
  });

  it("reports mixed units inside a column and a header unit that contradicts the mapping", () => {
    expect(issuesOf("B,G\n1 T,1\n2 T,1\n3 mT,1\n4 T,1\n")[0]).toMatchObject({ code: "mixed_units", row: 4, column: "B" });
    expect(issuesOf("B (mT),G\n1,1\n2,1\n3,1\n4,1\n", { ...fieldMap, xColumn: "B (mT)" })[0]).toMatchObject({
      code: "unit_mismatch",
      row: 1,
      column: "B (mT)",
    });
  });

  it("refuses empty cells, non-positive resistance and sigma, too few rows, an empty file", () => {
    expect(issuesOf("B,G\n0,1\n1,\n2,1\n3,1\n")[0]).toMatchObject({ code: "missing_value", row: 3, column: "G" });
    expect(issuesOf("B,R\n0,1\n1,-2\n2,1\n3,1\n", { ...fieldMap, yColumn: "R", yUnit: "ohm" })[0]).toMatchObject({ code: "nonpositive_resistance", row: 3 });
    expect(issuesOf("B,G,s\n0,1,0\n1,1,1\n2,1,1\n3,1,1\n", { ...fieldMap, sigmaColumn: "s" })[0]).toMatchObject({
      code: "nonpositive_sigma",
      row: 2,
      column: "s",
    });
    expect(issuesOf("B,G\n0,1\n1,1\n")[0].code).toBe("too_few_rows");
    expect(issuesOf("")[0].code).toBe("empty_file");
    expect(issuesOf("B,G\nNaN,1\n1,1\n2,1\n3,1\n")[0]).toMatchObject({ code: "not_finite", row: 2 });
  });

  it("previews columns, rows and units written in headers", () => {
    const p = previewCsv("B (mT),R [kohm]\n1,2\n2,3\n");
    expect(p.columns).toEqual(["B (mT)", "R [kohm]"]);
    expect(p.guessedUnits).toEqual({ "B (mT)": "mT", "R [kohm]": "kohm" });
    expect(p.totalRows).toBe(2);
  });

  // Fuzz: any text either parses into a sorted finite curve, or fails with DatasetCsvError whose
  // every issue is coded and names a row (a file line inside the file) or is file-wide.
  it("fuzzed files never throw anything but row-and-column errors", () => {
    const cell = fc.oneof(
      fc.double({ noNaN: false }).map(String),
      fc.integer().map(String),
      fc.constantFrom("", " ", "abc", "1e", "1,5", '"', '""', "1 T", "2 mT", "NaN", "-Infinity", "0x10", "\u00b5S", "1 e2/h"),
      fc.string({ maxLength: 6 }),
    );
    const row = fc.tuple(fc.array(cell, { minLength: 0, maxLength: 4 }), fc.constantFrom(",", ";", "\t")).map(([cs, sep]) => cs.join(sep));
    const file = fc
      .tuple(fc.constantFrom("B,G", "B,G,s", "x,y", "B;G", ""), fc.array(row, { maxLength: 25 }), fc.constantFrom("\n", "\r\n"))
      .map(([h, rows, nl]) => [h, ...rows].join(nl));
    fc.assert(
      fc.property(file, fc.boolean(), (text, withSigma) => {
        const lines = text.split(/\r?\n/).length;
        try {
          const d = parseDatasetCsv(text, { ...fieldMap, sigmaColumn: withSigma ? "s" : undefined });
          for (let i = 1; i < d.x.length; i++) expect(d.x[i]).toBeGreaterThan(d.x[i - 1]);
          expect(d.y.every(Number.isFinite)).toBe(true);
        } catch (e) {
          expect(e).toBeInstanceOf(DatasetCsvError);
          for (const i of (e as DatasetCsvError).issues) {
            expect(i.code).toMatch(/^[a-z_]+$/);
            expect(i.message.length).toBeGreaterThan(10);
            if (i.row !== null) {
              expect(i.row).toBeGreaterThanOrEqual(1);
              expect(i.row).toBeLessThanOrEqual(lines);
              expect(i.message).toMatch(/row/i);
            }
          }
        }
      }),
      { numRuns: 400, seed: 8 },
    );
  });

  it("fuzzed well-formed curves round-trip in value and order", () => {
    fc.assert(
      fc.property(fc.uniqueArray(fc.double({ min: -10, max: 10, noNaN: true, noDefaultInfinity: true }), { minLength: 4, maxLength: 40 }), (xsRaw) => {
        const xs = [...xsRaw].map((v) => (Object.is(v, -0) ? 0 : v)).sort((a, b) => a - b);
        if (new Set(xs).size !== xs.length) return;
        const text = csvText(
          ["B", "G"],
          xs.map((v, i) => [v, i + 1]),
        );
        const d = parseDatasetCsv(text, fieldMap);
        expect(d.x).toEqual(xs);
        expect(d.y).toEqual(xs.map((_, i) => i + 1));
      }),
      { numRuns: 200, seed: 3 },
    );
  });
});

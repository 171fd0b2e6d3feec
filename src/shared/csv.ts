/**
 * Parses an uploaded measurement (CSV) with its column mapping into a curve in the engine's
 * units. Pure (papaparse only; runs in the browser too, so the upload form shows the same errors
 * the server gives). Every problem names the file line ("row", 1-based, counting the header and
 * comment lines) and the column.
 */
import Papa from "papaparse";
import { convertX, convertY, isXUnit, isYUnit, recogniseUnit, X_UNIT_INFO, Y_UNIT_INFO, type XQuantity, type XUnit, type YUnit } from "./units";

export const DATASET_MAX_BYTES = 5 * 1024 * 1024;
export const DATASET_MAX_ROWS = 100_000;
export const DATASET_MIN_ROWS = 4;
const MAX_ISSUES = 20;

export interface ColumnMapping {
  xColumn: string;
  xUnit: XUnit;
  yColumn: string;
  yUnit: YUnit;
  /** Uncertainty of y, in the same unit as y. */
  sigmaColumn?: string;
  /** Sample temperature per row, in kelvin. */
  temperatureColumn?: string;
  /**
   * What y measures: "twoTerminal" (default: a two-terminal conductance or resistance, stored as
   * conductance in e2/h), or, in a Hall bar, "longitudinal" (R_xx) or "hall" (R_xy): a resistance
   * (ohm or kohm) stored in ohms as measured (R_xy may be negative), fitted with the hallBar kind.
   */
  yMeasures?: YMeasures;
}

export const Y_MEASURES = ["twoTerminal", "longitudinal", "hall"] as const;
export type YMeasures = (typeof Y_MEASURES)[number];

/** The stored y of a dataset in words and units, by what it measures. */
export const Y_MEASURES_INFO: Record<YMeasures, { label: string; short: string; unit: "e2/h" | "ohm"; resultPath: string }> = {
  twoTerminal: { label: "two-terminal conductance", short: "G", unit: "e2/h", resultPath: "conductance.total" },
  longitudinal: { label: "longitudinal resistance R_xx (Hall bar)", short: "R_xx", unit: "ohm", resultPath: "resistances.longitudinalOhms" },
  hall: { label: "Hall resistance R_xy (Hall bar)", short: "R_xy", unit: "ohm", resultPath: "resistances.hallOhms" },
};

/** What a mapping's y measures (older mappings have no field: two-terminal). */
export const yMeasuresOf = (mapping: Pick<ColumnMapping, "yMeasures">): YMeasures => mapping.yMeasures ?? "twoTerminal";

export type CsvIssueCode =
  | "empty_file"
  | "missing_column"
  | "duplicate_column"
  | "missing_value"
  | "non_numeric"
  | "not_finite"
  | "mixed_units"
  | "unit_mismatch"
  | "unsorted_x"
  | "duplicate_x"
  | "nonpositive_resistance"
  | "nonpositive_sigma"
  | "negative_temperature"
  | "too_few_rows"
  | "too_many_rows"
  | "malformed_row";

export interface CsvIssue {
  code: CsvIssueCode;
  /** File line (1-based), or null when the problem is not tied to one line. */
  row: number | null;
  /** Column name as in the header, or null. */
  column: string | null;
  message: string;
}

export class DatasetCsvError extends Error {
  constructor(readonly issues: CsvIssue[]) {
    super(issues.length === 1 ? issues[0].message : `${issues[0].message} (and ${issues.length - 1} more problem${issues.length > 2 ? "s" : ""})`);
    this.name = "DatasetCsvError";
  }
}

export interface ParsedDataset {
  /** What x measures and its stored unit (field: T, gate voltage: V, density: m^-2). */
  xQuantity: XQuantity;
  xCanonicalUnit: string;
  /** Ascending x in the canonical unit. */
  x: number[];
  /** Conductance in e^2/h; for a Hall-bar resistance (mapping.yMeasures "longitudinal" or "hall"), ohms. */
  y: number[];
  /** Uncertainty of y in the same unit, when a sigma column was mapped. */
  sigma: number[] | null;
  temperatureK: number[] | null;
  rows: number;
  /** The file's x ran downwards (it is stored ascending). */
  xDescending: boolean;
  columns: string[];
  mapping: ColumnMapping;
}

interface RawTable {
  header: string[];
  headerLine: number;
  rows: { line: number; cells: string[] }[];
}

/**
 * The number of records (header included) readCsvTable would find, counted from the file's bytes
 * without parsing it, or null when counting lines cannot decide it: the file has a quote (a quoted
 * cell may hold line breaks) or line ends other than all "\n" or all "\r\n". A record is a line
 * that does not start with '#' and holds a printable ASCII character other than a delimiter
 * (, ; | tab): such a line is never skipped as empty. Other lines are not counted, so the count is
 * never above the parser's. About 5 ms for 5 MB: it lets the server refuse a file over the row
 * limit before parsing it.
 */
export function countCsvRecords(bytes: Uint8Array): number | null {
  const n = bytes.length;
  let i = n >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  let records = 0;
  let lf = 0;
  let crlf = 0;
  let cr = 0;
  let lineStart = true;
  let comment = false;
  let data = false;
  for (; i < n; i++) {
    const b = bytes[i];
    if (b === 10) {
      lf++;
      if (i > 0 && bytes[i - 1] === 13) crlf++;
      if (data && !comment) records++;
      lineStart = true;
      data = false;
      comment = false;
      continue;
    }
    if (b === 13) {
      cr++;
      continue;
    }
    if (b === 34) return null;
    if (lineStart) {
      comment = b === 35;
      lineStart = false;
    }
    // printable ASCII except space , ; |
    if (b > 32 && b < 127 && b !== 44 && b !== 59 && b !== 124) data = true;
  }
  if (data && !comment) records++;
  if (cr > 0 && !(cr === crlf && crlf === lf)) return null;
  return records;
}

/** Splits the file into a header and rows with their file line numbers. Comment lines start with '#'. */
export function readCsvTable(text: string): RawTable {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const records: { line: number; cells: string[] }[] = [];
  const unclosed: number[] = []; // lines where a quote opens and never closes
  let counted = 0; // characters scanned for newlines
  let lines = 0; // newlines seen before `counted`
  Papa.parse<string[]>(body, {
    comments: "#",
    skipEmptyLines: "greedy",
    step: (r) => {
      let end = r.meta.cursor;
      while (end > 0 && (body[end - 1] === "\n" || body[end - 1] === "\r")) end--;
      for (; counted < end; counted++) if (body.charCodeAt(counted) === 10) lines++;
      // Newlines inside the record's cells, except a run at the very end of its last cell: an
      // unclosed quote swallows the file's final line break, which lies after `end`.
      const open = r.errors.some((e) => e.code === "MissingQuotes");
      let inner = 0;
      r.data.forEach((c, k) => {
        let stop = c.length;
        if (open && k === r.data.length - 1) while (stop > 0 && (c[stop - 1] === "\n" || c[stop - 1] === "\r")) stop--;
        for (let i = 0; i < stop; i++) if (c.charCodeAt(i) === 10) inner++;
      });
      const line = lines + 1 - inner;
      if (open) unclosed.push(line);
      records.push({ line, cells: r.data });
    },
  });
  if (unclosed.length) {
    throw new DatasetCsvError(
      unclosed.map((line) => ({
        code: "malformed_row" as const,
        row: line,
        column: null,
        message:
          `Row ${line}: a quote (") opens a cell here and is never closed, ` +
          `so the rest of the file would be read as one cell; close the quote or remove it.`,
      })),
    );
  }
  if (records.length === 0)
    throw new DatasetCsvError([
      {
        code: "empty_file",
        row: null,
        column: null,
        message: "The file has no header and no rows; expected a header line naming the columns, then one line per point.",
      },
    ]);
  const [head, ...rows] = records;
  return { header: head.cells.map((h) => h.trim()), headerLine: head.line, rows };
}

/** The column names and the first rows, for the column-mapping step. */
export function previewCsv(
  text: string,
  rows = 8,
): { columns: string[]; rows: string[][]; totalRows: number; guessedUnits: Record<string, string | undefined> } {
  const t = readCsvTable(text);
  const guessedUnits: Record<string, string | undefined> = {};
  for (const h of t.header) guessedUnits[h] = columnNameUnit(h);
  return { columns: t.header, rows: t.rows.slice(0, rows).map((r) => r.cells), totalRows: t.rows.length, guessedUnits };
}

/**
 * The unit a column's name states, for proposing a mapping: in brackets at the end ("B (mT)",
 * "R [kohm]") or as the last word after "_" or a space ("G_S", "R_kohm", "B mT", "G_e2/h").
 * Only the bracket form is binding (a cell or mapping that disagrees with it is an error); the
 * other forms are a guess the upload form shows and the user may change.
 */
export function columnNameUnit(header: string): XUnit | YUnit | undefined {
  const bracket = headerUnit(header);
  if (bracket) return bracket as XUnit | YUnit;
  const m = /[_\s]([^_\s]+)$/.exec(header.trim());
  return m ? recogniseUnit(m[1]) : undefined;
}

/** Where a proposed unit came from: the column's name, or a default because the name states none. */
export interface UnitAssumption<U extends string> {
  column: string;
  unit: U;
  source: "column name" | "default";
  /** One sentence for the upload form: what was assumed and why. */
  note: string;
}

const SIGMA_COLUMN = /sigma|err|unc|^d[GR]/i;
const TEMPERATURE_COLUMN = /temp|^T_?K\b|^T \(K\)/i;
const RESISTANCE_NAME = /^R\b|^R_|resist/i;

/** The unit proposed for an x column of that name. */
export function assumeXUnit(column: string): UnitAssumption<XUnit> {
  const u = columnNameUnit(column);
  if (u && isXUnit(u)) return { column, unit: u, source: "column name", note: `x in ${u}: read from the column name "${column}".` };
  return { column, unit: "T", source: "default", note: `x in T: the column name "${column}" states no unit of field, gate voltage or density; check it.` };
}

/** The unit proposed for a y (or uncertainty) column of that name: a resistance name without a unit is taken as ohm. */
export function assumeYUnit(column: string): UnitAssumption<YUnit> {
  const u = columnNameUnit(column);
  if (u && isYUnit(u)) return { column, unit: u, source: "column name", note: `y in ${u}: read from the column name "${column}".` };
  if (RESISTANCE_NAME.test(column))
    return { column, unit: "ohm", source: "default", note: `y in ohm: the column name "${column}" reads as a resistance but states no unit; check it.` };
  return { column, unit: "e2/h", source: "default", note: `y in e2/h: the column name "${column}" states no unit of conductance or resistance; check it.` };
}

/**
 * The mapping the upload form proposes for a file's columns: x the first column named in a unit
 * of x (else the first column), y the first other column named in a unit of y that is not an
 * uncertainty (else the next column), the uncertainty and temperature columns by name, units from
 * the names (assumeXUnit, assumeYUnit).
 */
export function proposeMapping(columns: string[]): { mapping: ColumnMapping; x: UnitAssumption<XUnit>; y: UnitAssumption<YUnit> } {
  const unitOf = (c: string) => columnNameUnit(c);
  const xColumn = columns.find((c) => !SIGMA_COLUMN.test(c) && isXUnit(unitOf(c) ?? "")) ?? columns[0] ?? "";
  const rest = columns.filter((c) => c !== xColumn);
  const yColumn = rest.find((c) => !SIGMA_COLUMN.test(c) && isYUnit(unitOf(c) ?? "")) ?? rest.find((c) => !SIGMA_COLUMN.test(c)) ?? rest[0] ?? "";
  const sigmaColumn = rest.find((c) => c !== yColumn && SIGMA_COLUMN.test(c));
  const temperatureColumn = rest.find((c) => c !== yColumn && c !== sigmaColumn && TEMPERATURE_COLUMN.test(c));
  const x = assumeXUnit(xColumn);
  const y = assumeYUnit(yColumn);
  return {
    mapping: {
      xColumn,
      xUnit: x.unit,
      yColumn,
      yUnit: y.unit,
      ...(sigmaColumn ? { sigmaColumn } : {}),
      ...(temperatureColumn ? { temperatureColumn } : {}),
    },
    x,
    y,
  };
}

/** A unit written in a header such as "B (mT)", "R [kohm]" or "G_e2/h". */
function headerUnit(header: string): string | undefined {
  const m = /[([]\s*([^)\]]+?)\s*[)\]]\s*$/.exec(header);
  if (!m) return undefined;
  return recogniseUnit(m[1]);
}

const NUMBER = /^\s*([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$/;

type Cell = { ok: true; value: number; unit?: string } | { ok: false; issue: CsvIssue };

function readCell(raw: string | undefined, line: number, column: string): Cell {
  const text = (raw ?? "").trim();
  const refuse = (code: CsvIssueCode, problem: string): Cell => ({
    ok: false,
    issue: { code, row: line, column, message: `Row ${line}, column "${column}": ${problem}` },
  });
  if (text === "") return refuse("missing_value", "the cell is empty; every point needs a number here.");
  if (/^[+-]?(nan|inf|infinity)$/i.test(text)) return refuse("not_finite", `"${clip(text)}" is not a finite number.`);
  const m = NUMBER.exec(text);
  if (!m) return refuse("non_numeric", `"${clip(text)}" is not a number (expected e.g. 0.125 or 1.5e-3, optionally followed by its unit).`);
  const value = Number(m[1]);
  if (!Number.isFinite(value)) return refuse("not_finite", `"${clip(text)}" is out of range.`);
  if (m[2]) {
    const unit = recogniseUnit(m[2]);
    if (!unit) return refuse("non_numeric", `"${clip(text)}" is not a number (the text after it, "${clip(m[2])}", is not a unit we know).`);
    return { ok: true, value, unit };
  }
  return { ok: true, value };
}

const clip = (s: string) => (s.length > 40 ? s.slice(0, 40) + "…" : s);

function findColumn(header: string[], name: string): number {
  const exact = header.indexOf(name);
  if (exact >= 0) return exact;
  const lower = name.trim().toLowerCase();
  return header.findIndex((h) => h.toLowerCase() === lower);
}

/** Parses the CSV with its mapping. Throws DatasetCsvError listing (up to 20) problems. */
export function parseDatasetCsv(text: string, mapping: ColumnMapping): ParsedDataset {
  if (!isXUnit(mapping.xUnit))
    throw new DatasetCsvError([
      { code: "unit_mismatch", row: null, column: mapping.xColumn, message: `xUnit "${mapping.xUnit}" is not allowed; use one of T, mT, V, cm^-2.` },
    ]);
  if (!isYUnit(mapping.yUnit))
    throw new DatasetCsvError([
      { code: "unit_mismatch", row: null, column: mapping.yColumn, message: `yUnit "${mapping.yUnit}" is not allowed; use one of S, uS, e2/h, ohm, kohm.` },
    ]);
  if (mapping.yMeasures !== undefined && !(Y_MEASURES as readonly string[]).includes(mapping.yMeasures))
    throw new DatasetCsvError([
      {
        code: "unit_mismatch",
        row: null,
        column: mapping.yColumn,
        message: `yMeasures "${String(mapping.yMeasures)}" is not allowed; use one of ${Y_MEASURES.join(", ")}.`,
      },
    ]);
  const hallBar = yMeasuresOf(mapping) !== "twoTerminal";
  if (hallBar && Y_UNIT_INFO[mapping.yUnit].kind !== "resistance")
    throw new DatasetCsvError([
      {
        code: "unit_mismatch",
        row: null,
        column: mapping.yColumn,
        message: `y measures ${Y_MEASURES_INFO[yMeasuresOf(mapping)].short}, a resistance: give it in ohm or kohm (yUnit is "${mapping.yUnit}").`,
      },
    ]);
  const table = readCsvTable(text);
  const issues: CsvIssue[] = [];
  const push = (i: CsvIssue) => {
    if (issues.length < MAX_ISSUES) issues.push(i);
  };
  const done = () => issues.length >= MAX_ISSUES;

  const wanted: { role: "x" | "y" | "sigma" | "temperature"; name: string; unit?: string }[] = [
    { role: "x", name: mapping.xColumn, unit: mapping.xUnit },
    { role: "y", name: mapping.yColumn, unit: mapping.yUnit },
  ];
  if (mapping.sigmaColumn) wanted.push({ role: "sigma", name: mapping.sigmaColumn, unit: mapping.yUnit });
  if (mapping.temperatureColumn) wanted.push({ role: "temperature", name: mapping.temperatureColumn });
  const index: Partial<Record<"x" | "y" | "sigma" | "temperature", number>> = {};
  for (const w of wanted) {
    const i = findColumn(table.header, w.name);
    if (i < 0) {
      push({
        code: "missing_column",
        row: table.headerLine,
        column: w.name,
        message:
          `Column "${w.name}" (mapped as ${w.role}) is not in the header on row ${table.headerLine}; ` +
          `the file has: ${table.header.map((h) => `"${h}"`).join(", ") || "no columns"}.`,
      });
      continue;
    }
    const dupes = table.header.filter((h) => h.toLowerCase() === table.header[i].toLowerCase()).length;
    if (dupes > 1)
      push({
        code: "duplicate_column",
        row: table.headerLine,
        column: w.name,
        message: `Column "${w.name}" appears ${dupes} times in the header on row ${table.headerLine}; rename one so the mapping is unambiguous.`,
      });
    const hu = headerUnit(table.header[i]);
    if (w.unit && hu && hu !== w.unit) {
      push({
        code: "unit_mismatch",
        row: table.headerLine,
        column: table.header[i],
        message: `Column "${table.header[i]}" says ${hu} in its header, but it was mapped with unit ${w.unit}; pick the unit the column is in.`,
      });
    }
    index[w.role] = i;
  }
  if (issues.length) throw new DatasetCsvError(issues);
  if (table.rows.length > DATASET_MAX_ROWS) {
    throw new DatasetCsvError([
      { code: "too_many_rows", row: null, column: null, message: `The file has ${table.rows.length} rows; at most ${DATASET_MAX_ROWS} are allowed.` },
    ]);
  }

  const xRaw: number[] = [];
  const yRaw: number[] = [];
  const sRaw: number[] = [];
  const tRaw: number[] = [];
  const lineOf: number[] = [];
  const unitSeen: Partial<Record<string, { unit: string; line: number }>> = {};
  for (const r of table.rows) {
    if (done()) break;
    let rowOk = true;
    const values: Partial<Record<string, number>> = {};
    for (const w of wanted) {
      const col = table.header[index[w.role]!];
      const cell = readCell(r.cells[index[w.role]!], r.line, col);
      if (!cell.ok) {
        push(cell.issue);
        rowOk = false;
        continue;
      }
      if (cell.unit) {
        const first = unitSeen[w.role];
        if (first && first.unit !== cell.unit) {
          push({
            code: "mixed_units",
            row: r.line,
            column: col,
            message: `Row ${r.line}, column "${col}": this cell is in ${cell.unit} but row ${first.line} is in ${first.unit}; one column must use one unit.`,
          });
          rowOk = false;
          continue;
        }
        if (!first) unitSeen[w.role] = { unit: cell.unit, line: r.line };
        if (w.unit && cell.unit !== w.unit) {
          push({
            code: "mixed_units",
            row: r.line,
            column: col,
            message: `Row ${r.line}, column "${col}": this cell is in ${cell.unit} but the column was mapped with unit ${w.unit}.`,
          });
          rowOk = false;
          continue;
        }
        if (w.role === "temperature" && cell.unit) {
          push({
            code: "unit_mismatch",
            row: r.line,
            column: col,
            message: `Row ${r.line}, column "${col}": temperatures are plain numbers in kelvin, without a unit.`,
          });
          rowOk = false;
          continue;
        }
      }
      values[w.role] = cell.value;
    }
    if (!rowOk) continue;
    if (Y_UNIT_INFO[mapping.yUnit].kind === "resistance" && !hallBar && !(values.y! > 0)) {
      push({
        code: "nonpositive_resistance",
        row: r.line,
        column: table.header[index.y!],
        message:
          `Row ${r.line}, column "${table.header[index.y!]}": a resistance of ${values.y} ${mapping.yUnit} ` +
          `cannot be turned into a conductance; resistances must be positive.`,
      });
      continue;
    }
    if (values.sigma !== undefined && !(values.sigma > 0)) {
      push({
        code: "nonpositive_sigma",
        row: r.line,
        column: table.header[index.sigma!],
        message: `Row ${r.line}, column "${table.header[index.sigma!]}": an uncertainty must be positive (got ${values.sigma}).`,
      });
      continue;
    }
    if (values.temperature !== undefined && !(values.temperature >= 0)) {
      push({
        code: "negative_temperature",
        row: r.line,
        column: table.header[index.temperature!],
        message: `Row ${r.line}, column "${table.header[index.temperature!]}": a temperature in kelvin cannot be negative (got ${values.temperature}).`,
      });
      continue;
    }
    xRaw.push(values.x!);
    yRaw.push(values.y!);
    if (values.sigma !== undefined) sRaw.push(values.sigma);
    if (values.temperature !== undefined) tRaw.push(values.temperature);
    lineOf.push(r.line);
  }
  if (issues.length) throw new DatasetCsvError(issues);

  // x must be strictly monotonic (either direction): report the first row that breaks the order.
  const xCol = table.header[index.x!];
  const descending = xRaw.length >= 2 && xRaw[1] < xRaw[0];
  for (let i = 1; i < xRaw.length && !done(); i++) {
    if (xRaw[i] === xRaw[i - 1]) {
      push({
        code: "duplicate_x",
        row: lineOf[i],
        column: xCol,
        message:
          `Row ${lineOf[i]}, column "${xCol}": x = ${xRaw[i]} repeats row ${lineOf[i - 1]}; ` + `each x may appear once (average repeated measurements first).`,
      });
    } else if (descending ? xRaw[i] > xRaw[i - 1] : xRaw[i] < xRaw[i - 1]) {
      push({
        code: "unsorted_x",
        row: lineOf[i],
        column: xCol,
        message:
          `Row ${lineOf[i]}, column "${xCol}": x = ${xRaw[i]} comes after ${xRaw[i - 1]} (row ${lineOf[i - 1]}), ` +
          `but the column runs ${descending ? "downwards" : "upwards"}; x must be sorted (one direction, no repeats).`,
      });
    }
  }
  if (issues.length) throw new DatasetCsvError(issues);
  if (xRaw.length < DATASET_MIN_ROWS) {
    throw new DatasetCsvError([
      {
        code: "too_few_rows",
        row: null,
        column: null,
        message: `The file has ${xRaw.length} data row${xRaw.length === 1 ? "" : "s"}; at least ${DATASET_MIN_ROWS} are needed.`,
      },
    ]);
  }

  const n = xRaw.length;
  const x = new Array<number>(n);
  const y = new Array<number>(n);
  const sigma = mapping.sigmaColumn ? new Array<number>(n) : null;
  const temperatureK = mapping.temperatureColumn ? new Array<number>(n) : null;
  for (let k = 0; k < n; k++) {
    const i = descending ? n - 1 - k : k;
    x[k] = convertX(xRaw[i], mapping.xUnit);
    if (hallBar) {
      // a Hall-bar resistance stays a resistance, in ohms
      const toOhm = Y_UNIT_INFO[mapping.yUnit].toSi;
      y[k] = yRaw[i] * toOhm;
      if (sigma) sigma[k] = sRaw[i] * toOhm;
    } else {
      const c = convertY(yRaw[i], mapping.yUnit, sigma ? sRaw[i] : undefined)!;
      y[k] = c.g;
      if (sigma) sigma[k] = c.sigma!;
    }
    if (temperatureK) temperatureK[k] = tRaw[i];
  }
  const info = X_UNIT_INFO[mapping.xUnit];
  return {
    xQuantity: info.quantity,
    xCanonicalUnit: info.canonicalUnit,
    x,
    y,
    sigma,
    temperatureK,
    rows: n,
    xDescending: descending,
    columns: table.header,
    mapping,
  };
}

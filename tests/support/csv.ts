// The tests' one CSV writer, and the upload body of POST /api/v1/datasets.
//
//   csvText(["B (T)", "G (e2/h)"], [[0, 2.1], [0.05, 2.3]])                  -> "B (T),G (e2/h)\n0,2.1\n0.05,2.3"
//   csvText(["B", "G"], rows, { comments: ["synthetic"], finalNewline: true })  -> "# synthetic\nB,G\n...\n"
//   await api("/api/v1/datasets", { method: "POST", body: datasetForm(text, mapping) });
//
// Cells go through papaparse's writer (the library the product reads uploads with), so a cell that
// holds a comma, a quote or a line break stays one cell. Text meant to be malformed CSV is written
// out literally in the test that needs it, not through here.
import Papa from "papaparse";

export interface CsvOptions {
  /** Lines before the header, each written as "# " + text (the product skips them). */
  comments?: string[];
  /** End the last line with a line break, as most saved files do. */
  finalNewline?: boolean;
}

/** CSV text: optional comment lines, the header, one line per row; "\n" line ends. */
export function csvText(header: readonly string[], rows: readonly (readonly unknown[])[], opts: CsvOptions = {}): string {
  const table = Papa.unparse([[...header], ...rows.map((r) => [...r])], { newline: "\n" });
  const comments = (opts.comments ?? []).map((c) => `# ${c}\n`).join("");
  return comments + table + (opts.finalNewline ? "\n" : "");
}

/** The multipart body of a dataset upload: the file (text or raw bytes) and the mapping fields. */
export function datasetForm(file: string | Uint8Array, fields: Record<string, string>, fileName = "curve.csv"): FormData {
  const form = new FormData();
  form.set("file", new Blob([file as BlobPart], { type: "text/csv" }), fileName);
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  return form;
}

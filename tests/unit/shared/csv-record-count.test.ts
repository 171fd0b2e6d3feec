// countCsvRecords (src/shared/csv.ts): the line count the server refuses an over-long upload by,
// before parsing it, never exceeds the parser's record count and equals it whenever it decides.
import { describe, expect, it } from "vitest";
import { countCsvRecords, readCsvTable } from "../../../src/shared/csv";
import { seededUniform } from "../../support/random";

const bytes = (s: string) => new TextEncoder().encode(s);
const records = (s: string) => {
  const t = readCsvTable(s);
  return t.rows.length + 1;
};

describe("countCsvRecords", () => {
  it("counts header and rows, skipping comments, blank and delimiter-only lines, with LF or CRLF ends", () => {
    const cases = [
      "B,G\n0,1\n1,2\n",
      "# synthetic\nB,G\n0,1\n\n1,2",
      "\ufeffB;G\r\n0;1\r\n;;\r\n1;2\r\n",
      "B\tG\n  \n0\t1\n#c\n1\t2\n \t\n",
      "B,G\n0 mT,1\n µ ,2\n",
    ];
    for (const c of cases) expect(countCsvRecords(bytes(c)), JSON.stringify(c)).toBe(records(c));
  });

  it("declines to decide for quotes and mixed line ends", () => {
    expect(countCsvRecords(bytes('B,G\n"0\n1",2\n'))).toBeNull();
    expect(countCsvRecords(bytes("B,G\r\n0,1\n1,2\r\n"))).toBeNull();
    expect(countCsvRecords(bytes("B,G\r0,1\r1,2\r"))).toBeNull();
  });

  it("is never above the parser's count on random files of digits, delimiters, spaces, comments and line ends", () => {
    const rand = seededUniform(16);
    const alphabet = ["0", "1", ".", ",", ";", "\t", " ", "#", "\n", "\n", "\r\n", "|", "x", "µ"];
    let decided = 0;
    for (let k = 0; k < 400; k++) {
      const crlf = rand() < 0.5;
      let s = "";
      const n = 1 + Math.floor(rand() * 60);
      for (let i = 0; i < n; i++) {
        let c = alphabet[Math.floor(rand() * alphabet.length)];
        if (c === "\n" || c === "\r\n") c = crlf ? "\r\n" : "\n";
        s += c;
      }
      const counted = countCsvRecords(bytes(s));
      let parsed = 0;
      try {
        parsed = records(s);
      } catch {
        parsed = 0; // no record at all: every line a comment or blank
      }
      if (counted !== null) decided++;
      if (counted !== null) expect(counted, JSON.stringify(s)).toBeLessThanOrEqual(parsed);
    }
    expect(decided).toBeGreaterThan(300);
  });

  it("equals the parser's count on random numeric files with one delimiter, blank lines and comments", () => {
    const rand = seededUniform(5);
    for (let k = 0; k < 200; k++) {
      const d = [",", ";", "\t"][k % 3];
      const nl = k % 2 ? "\r\n" : "\n";
      const lines = ["# synthetic", `B${d}G`];
      const n = Math.floor(rand() * 40);
      for (let i = 0; i < n; i++) {
        const r = rand();
        lines.push(r < 0.1 ? "" : r < 0.15 ? "# note" : r < 0.2 ? `${d}${d}` : r < 0.25 ? "   " : `${(rand() * 10).toFixed(3)}${d} ${i}`);
      }
      const s = lines.join(nl) + (rand() < 0.5 ? nl : "");
      expect(countCsvRecords(bytes(s)), JSON.stringify(s)).toBe(records(s));
    }
  });
});

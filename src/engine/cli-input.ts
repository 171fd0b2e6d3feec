/**
 * Reading a command line's JSON file (a path, or `-` for standard input), shared by `compute` and
 * the remote `submit` (src/client/commands.ts), so both refuse an unreadable or malformed file with
 * the same one line (exit code 2).
 */
import { readFileSync } from "node:fs";

export type JsonFileRead = { ok: true; json: unknown } | { ok: false; line: string };

export function readJsonFile(file: string): JsonFileRead {
  let text: string;
  try {
    text = readFileSync(file === "-" ? 0 : file, "utf8");
  } catch (e) {
    return { ok: false, line: `input: cannot read ${file === "-" ? "standard input" : file}: ${(e as Error).message}` };
  }
  try {
    return { ok: true, json: JSON.parse(text) };
  } catch (e) {
    return { ok: false, line: `input: not valid JSON: ${(e as Error).message.split("\n")[0]}` };
  }
}

/**
 * The `compute` command: `npm run -s cli -- compute FILE.json` (or `-` for standard input) prints
 * one JSON object on standard output. Invalid input or a refused computation: exit code 2 and one
 * line on standard error naming the field. Other failures: exit code 1. The command line's entry,
 * src/cli.ts, hands `compute` here and the remote commands to src/client/commands.ts.
 */
import { readJsonFile } from "./cli-input";
// Through the engine's entry point, so the kernel backend is chosen exactly as for the worker
// (and engineVersion names it): the command line and the API give the same result.
import { compute, EngineInputError, EngineLimitError, parseComputeInput } from "./index";

function usage(): never {
  process.stderr.write("usage: npm run -s cli -- compute FILE.json   (FILE.json may be - for standard input)\n");
  process.exit(2);
}

/** The one line `compute` prints for input it refuses (exit code 2), or null for any other error. */
export function refusalLine(e: unknown): string | null {
  if (e instanceof EngineInputError) return e.message.replace(/\s*\n\s*/g, " ");
  if (e instanceof EngineLimitError) return `refused: ${e.reason}`;
  return null;
}

/** `compute FILE`: the arguments after the command's name. */
export function computeCommand(args: string[]): void {
  const [file, ...rest] = args;
  if (!file || rest.length > 0) usage();
  const read = readJsonFile(file);
  if (!read.ok) {
    process.stderr.write(`${read.line}\n`);
    process.exit(2);
  }
  try {
    const input = parseComputeInput(read.json);
    const result = compute(input);
    process.stdout.write(`${JSON.stringify(result)}\n`);
  } catch (e) {
    const refused = refusalLine(e);
    if (refused !== null) {
      process.stderr.write(`${refused}\n`);
      process.exit(2);
    }
    process.stderr.write(`error: ${(e as Error).message}\n`);
    process.exit(1);
  }
}

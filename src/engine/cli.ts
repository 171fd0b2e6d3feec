/**
 * Command line: `npm run -s cli -- compute FILE.json` (or `-` for standard input) prints one JSON
 * object on standard output. Invalid input or a refused computation: exit code 2 and one line on
 * standard error naming the field. Other failures: exit code 1.
 */
import { readFileSync } from "node:fs";
// Through the engine's entry point, so the kernel backend is chosen exactly as for the worker
// (and engineVersion names it): the command line and the API give the same result.
import { compute, EngineInputError, EngineLimitError, parseComputeInput } from "./index";

function usage(): never {
  process.stderr.write("usage: npm run -s cli -- compute FILE.json   (FILE.json may be - for standard input)\n");
  process.exit(2);
}

function main(argv: string[]): void {
  const [command, file, ...rest] = argv;
  if (command !== "compute" || !file || rest.length > 0) usage();
  let text: string;
  try {
    text = readFileSync(file === "-" ? 0 : file, "utf8");
  } catch (e) {
    process.stderr.write(`input: cannot read ${file === "-" ? "standard input" : file}: ${(e as Error).message}\n`);
    process.exit(2);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    process.stderr.write(`input: not valid JSON: ${(e as Error).message.split("\n")[0]}\n`);
    process.exit(2);
  }
  try {
    const input = parseComputeInput(json);
    const result = compute(input);
    process.stdout.write(`${JSON.stringify(result)}\n`);
  } catch (e) {
    if (e instanceof EngineInputError) {
      process.stderr.write(`${e.message.replace(/\s*\n\s*/g, " ")}\n`);
      process.exit(2);
    }
    if (e instanceof EngineLimitError) {
      process.stderr.write(`refused: ${e.reason}\n`);
      process.exit(2);
    }
    process.stderr.write(`error: ${(e as Error).message}\n`);
    process.exit(1);
  }
}

main(process.argv.slice(2));

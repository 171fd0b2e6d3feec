/**
 * The command line's entry (`npm run -s cli -- COMMAND ...`, bundled into dist/engine-cli.mjs by
 * scripts/build-cli.mjs): `compute` runs the engine here (src/engine/cli.ts); `submit`, `status`,
 * `cancel` and `fetch` talk to a Triskel service (src/client/commands.ts). The engine is imported
 * as before, so `compute` starts exactly as it did; the remote commands are loaded only when one
 * is asked for.
 */
import { computeCommand } from "./engine/cli";

const REMOTE = ["submit", "status", "cancel", "fetch"];

async function main(argv: string[]): Promise<void> {
  const [command, ...args] = argv;
  if (command === "compute") {
    computeCommand(args);
    return;
  }
  const { remoteCommand, USAGE } = await import("./client/commands");
  if (command === "help" || command === "--help" || command === "-h") {
    process.stdout.write(USAGE);
    return;
  }
  if (!command || !REMOTE.includes(command)) {
    process.stderr.write(
      `usage: ${command ? `unknown command "${command}"` : "no command"}; commands: compute, ${REMOTE.join(", ")} (npm run -s cli -- help lists them)\n`,
    );
    process.exit(2);
  }
  process.exit(await remoteCommand(command, args));
}

void main(process.argv.slice(2));

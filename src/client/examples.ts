/**
 * The "from a script" examples: files under docs/examples/ that the manual's page
 * (/manual/scripts) and docs/scripts.md show verbatim and tests/integration/script-examples.test.ts
 * runs against a live instance, so what is shown is what was tested.
 */
export interface ScriptExample {
  /** Path from the repository's root. */
  file: string;
  title: string;
  /** What the example shows, one sentence. */
  about: string;
  language: "sh" | "python" | "json";
}

export const SCRIPT_EXAMPLES: readonly ScriptExample[] = [
  {
    file: "docs/examples/run.json",
    title: "A calculation file",
    about: "The file compute takes: a network and a computation (a small clean triangular network, synthetic).",
    language: "json",
  },
  {
    file: "docs/examples/scan.json",
    title: "A scan file",
    about: "The same with a sweep member: five fields from 0 to 0.2 T.",
    language: "json",
  },
  {
    file: "docs/examples/cli.sh",
    title: "The command line",
    about: "Submit and wait, a scan with its CSV, submit without waiting and fetch later, an estimate first, exit codes.",
    language: "sh",
  },
  {
    file: "docs/examples/client.py",
    title: "The Python client",
    about: "An estimate, a calculation, a scan and its CSV, and an error with its status, code and message.",
    language: "python",
  },
];

// Entry of the web server's analysis thread (./index.ts). Plain JavaScript because the thread
// starts in whatever process hosts the pool: `next start` (which cannot load TypeScript by itself),
// `next dev`, Vitest or the tsx-run worker. tsx compiles ./tasks.ts and what it imports from the
// source tree, resolving "@/" through tsconfig.json, the way the worker and the scripts run.
import { tsImport } from "tsx/esm/api";

const tasks = await tsImport("./tasks.ts", import.meta.url);

export default tasks.default;

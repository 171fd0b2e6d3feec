// Runs once when the Next.js server starts: validate the environment before serving anything,
// so a bad value stops the server with one line naming it instead of failing on first request.
import "@/server/server-only";
export async function register() {
  // NEXT_RUNTIME is set by Next.js itself ("nodejs" or "edge"), not by a deployment, so it is not
  // part of src/env.ts: the environment is validated only in the Node.js runtime.
  if (process.env.NEXT_RUNTIME === "nodejs") {
    const { loadEnvOrExit } = await import("./env");
    loadEnvOrExit();
    // TRACE, methods an endpoint lacks and undecodable /api paths: JSON errors, not Next's pages.
    const { installMethodGuard } = await import("./server/http/method-guard");
    installMethodGuard();
  }
}

// Runs once when the Next.js server starts: validate the environment before serving anything,
// so a bad value stops the server with one line naming it instead of failing on first request.
export async function register() {
  if (process.env.NEXT_RUNTIME === "nodejs") {
    const { loadEnvOrExit } = await import("./env");
    loadEnvOrExit();
  }
}

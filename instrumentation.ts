// Runs once when the Next.js server starts: validate the configuration so that
// a missing or malformed variable stops the server with its name.
export async function register() {
  if (process.env.NEXT_RUNTIME === "nodejs") {
    const { requireEnvOrExit } = await import("./lib/env");
    requireEnvOrExit("web");
  }
}

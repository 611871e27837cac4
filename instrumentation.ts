// Runs once when the Next.js server starts: validate the configuration so that
// a missing or malformed variable stops the server with its name, and stamp
// every request with the client address rate limits count
// (lib/http/stamp-client-address.ts).
export async function register() {
  if (process.env.NEXT_RUNTIME === "nodejs") {
    const { requireEnvOrExit } = await import("./lib/env");
    const env = requireEnvOrExit("web");
    const { installClientAddressStamp } = await import("./lib/http/stamp-client-address");
    installClientAddressStamp(env.TRUSTED_PROXY_HOPS);
  }
}

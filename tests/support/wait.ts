// Waiting for a state with a generous timeout (never a timed assertion): `read`
// returns undefined while the state has not come, and may throw to give up early.
export async function waitFor<T>(what: string, read: () => Promise<T | undefined>, timeoutMs = 90_000, intervalMs = 200): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await read();
    if (value !== undefined) return value;
    if (Date.now() > deadline) throw new Error(`${what} did not happen within ${timeoutMs / 1000} s`);
    await new Promise((r) => setTimeout(r, intervalMs));
  }
}

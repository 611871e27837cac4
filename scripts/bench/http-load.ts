// The second process of the gallery benchmark: a steady closed-loop load of
// `concurrency` clients on one URL for `durationMs`, then one JSON line with the
// latencies. Run by scripts/bench-gallery.ts; never run by hand.
const [url, concurrencyText, durationText] = process.argv.slice(2);
const concurrency = Number(concurrencyText);
const durationMs = Number(durationText);
if (!url || !(concurrency > 0) || !(durationMs > 0)) {
  console.error("usage: http-load URL CONCURRENCY DURATION_MS");
  process.exit(2);
}

const latencies: number[] = [];
const statuses = new Map<number, number>();
const deadline = performance.now() + durationMs;

async function client(): Promise<void> {
  while (performance.now() < deadline) {
    const started = performance.now();
    const res = await fetch(url);
    await res.arrayBuffer();
    latencies.push(performance.now() - started);
    statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1);
  }
}

await Promise.all(Array.from({ length: concurrency }, client));
latencies.sort((a, b) => a - b);
const at = (q: number) => latencies[Math.min(latencies.length - 1, Math.floor(q * latencies.length))];
console.log(JSON.stringify({ url, requests: latencies.length, perSecond: latencies.length / (durationMs / 1000), p50Ms: at(0.5), p95Ms: at(0.95), maxMs: latencies.at(-1), statuses: Object.fromEntries(statuses) }));
export {};

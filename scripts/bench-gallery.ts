// Gallery benchmark, on loopback against a running app (npm start, with the demo
// plates published). Prints, with ratios to baselines measured in this same run:
//  (a) the gallery API's latency under a steady load from a second process
//      (closed loop, 4 clients, 10 s), over the same load on /api/me (the route
//      wrapper's floor: a session check and a 401, no query);
//  (b) the time to the first tile drawn on a plate page in Chromium, cold, over
//      the same page's DOMContentLoaded (what any page costs before its image).
// Run: npm run bench -- gallery   (APP_URL picks the app; default http://127.0.0.1:3000)
import { spawn } from "node:child_process";
import path from "node:path";
import { launchBrowser } from "../tests/support/browser";

const APP = (process.env.APP_URL ?? "http://127.0.0.1:3000").replace(/\/+$/, "");
const CONCURRENCY = 4;
const DURATION_MS = 10_000;
const PAGE_RUNS = 5;

interface LoadResult {
  url: string;
  requests: number;
  perSecond: number;
  p50Ms: number;
  p95Ms: number;
  maxMs: number;
  statuses: Record<string, number>;
}

function runLoad(url: string): Promise<LoadResult> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ["--import", "tsx", path.resolve("scripts/bench/http-load.ts"), url, String(CONCURRENCY), String(DURATION_MS)], { stdio: ["ignore", "pipe", "inherit"] });
    let out = "";
    child.stdout.on("data", (d: Buffer) => (out += d.toString()));
    child.on("error", reject);
    child.on("exit", (code) => (code === 0 ? resolve(JSON.parse(out.trim().split("\n").at(-1) ?? "{}") as LoadResult) : reject(new Error(`load process exited with ${code}`))));
  });
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

async function main(): Promise<void> {
  const first = await fetch(`${APP}/api/plates?limit=1`).catch(() => null);
  const body = first?.ok ? ((await first.json()) as { plates: { slug: string; eclipseId: string }[] }) : null;
  const plate = body?.plates[0];
  if (!plate) {
    console.error(`No published plate at ${APP}: start the app with npm start (it publishes the demo plates) or set APP_URL.`);
    process.exitCode = 1;
    return;
  }
  console.log(`gallery benchmark against ${APP}, plate ${plate.slug}`);

  // (a) The floor first, then the gallery API, each for 10 s from a second process.
  const floor = await runLoad(`${APP}/api/me`);
  const gallery = await runLoad(`${APP}/api/plates?eclipse=${plate.eclipseId}&limit=24`);
  for (const r of [floor, gallery]) {
    console.log(`${r.url}: ${r.requests} requests, ${r.perSecond.toFixed(0)}/s, p50 ${r.p50Ms.toFixed(1)} ms, p95 ${r.p95Ms.toFixed(1)} ms, max ${r.maxMs.toFixed(0)} ms, statuses ${JSON.stringify(r.statuses)}`);
  }
  console.log(`(a) gallery API p50 / route floor p50 = ${(gallery.p50Ms / floor.p50Ms).toFixed(2)}; p95 ratio ${(gallery.p95Ms / floor.p95Ms).toFixed(2)}`);

  // (b) Cold plate page loads: a new browser context each time (empty cache).
  const browser = await launchBrowser();
  const firstTile: number[] = [];
  const domReady: number[] = [];
  try {
    for (let i = 0; i < PAGE_RUNS; i++) {
      const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
      const page = await ctx.newPage();
      const tile = page.waitForResponse((r) => /-iiif\/.+\/default\.jpg$|_files\/\d+\/\d+_\d+\.jpg$/.test(r.url()), { timeout: 60_000 });
      await page.goto(`${APP}/plates/${plate.slug}`, { waitUntil: "domcontentloaded" });
      await tile;
      // The tile is drawn on the next frame after it arrives.
      await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r))));
      const t = await page.evaluate(() => {
        const nav = performance.getEntriesByType("navigation")[0] as PerformanceNavigationTiming;
        const tiles = performance.getEntriesByType("resource").filter((e) => /-iiif\/.+\/default\.jpg$|_files\/\d+\/\d+_\d+\.jpg$/.test(e.name)) as PerformanceResourceTiming[];
        return { dom: nav.domContentLoadedEventEnd, tile: Math.min(...tiles.map((e) => e.responseEnd)), now: performance.now() };
      });
      domReady.push(t.dom);
      firstTile.push(Math.max(t.tile, t.dom));
      await ctx.close();
    }
  } finally {
    await browser.close();
  }
  console.log(`plate page, ${PAGE_RUNS} cold loads: DOMContentLoaded median ${median(domReady).toFixed(0)} ms, first tile drawn median ${median(firstTile).toFixed(0)} ms (runs: ${firstTile.map((x) => x.toFixed(0)).join(", ")})`);
  console.log(`(b) first tile / DOMContentLoaded = ${(median(firstTile) / median(domReady)).toFixed(2)}`);
  console.log(JSON.stringify({ bench: "gallery", app: APP, load: { concurrency: CONCURRENCY, durationMs: DURATION_MS, floor, gallery }, plateFirstTileMs: firstTile, plateDomReadyMs: domReady }));
}

await main();

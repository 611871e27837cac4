// Compares two reduction output folders (e.g. outputs-stages.ts --keep before and
// after a change): every file present in both; FITS and report byte for byte
// (the report without its timings); PNGs and JPEGs by their decoded pixels,
// giving how many samples differ and by how much at most.
// Run: npx tsx scripts/bench/compare-outputs.ts DIR_A DIR_B
import { readdirSync, readFileSync } from "node:fs";
import { join, relative } from "node:path";
import sharp from "sharp";

function listFiles(root: string): string[] {
  return readdirSync(root, { recursive: true, withFileTypes: true }).filter((e) => e.isFile()).map((e) => relative(root, join(e.parentPath, e.name))).sort();
}

async function pixels(path: string): Promise<Uint16Array | Uint8Array> {
  const image = sharp(path);
  const meta = await image.metadata();
  if (meta.depth === "ushort") {
    const data = await image.toColourspace(meta.channels === 1 ? "grey16" : "rgb16").raw({ depth: "ushort" }).toBuffer();
    return new Uint16Array(data.buffer.slice(data.byteOffset, data.byteOffset + data.length));
  }
  return new Uint8Array(await image.raw().toBuffer());
}

/** Bytes of a FITS file's primary header: up to the 2880-byte block holding the END card. */
function fitsHeaderBytes(bytes: Buffer): number {
  for (let at = 0; at < bytes.length; at += 80) if (bytes.toString("latin1", at, at + 8) === "END     ") return Math.ceil((at + 80) / 2880) * 2880;
  return bytes.length;
}

/** The report without what changes from run to run (timings, the creation time). */
function withoutTimings(text: string): string {
  const report = JSON.parse(text) as Record<string, unknown>;
  delete report.timingsMs;
  delete report.createdUtc;
  const overall = report.overall as Record<string, unknown> | undefined;
  if (overall) delete overall.timingsMs;
  return JSON.stringify(report);
}

async function main(): Promise<void> {
  const [a, b] = process.argv.slice(2);
  if (!a || !b) throw new Error("usage: compare-outputs.ts DIR_A DIR_B");
  const filesA = listFiles(a), filesB = listFiles(b);
  const onlyA = filesA.filter((f) => !filesB.includes(f)), onlyB = filesB.filter((f) => !filesA.includes(f));
  console.log(`${filesA.length} and ${filesB.length} files; only in the first: ${onlyA.join(", ") || "none"}; only in the second: ${onlyB.join(", ") || "none"}`);
  let tileSamples = 0, tileDiffer = 0, tileMax = 0, tileFiles = 0, tileFilesDiffer = 0;
  for (const f of filesA.filter((x) => filesB.includes(x))) {
    const bytesA = readFileSync(join(a, f)), bytesB = readFileSync(join(b, f));
    const isTile = f.startsWith("tiles/") && f.endsWith(".jpg");
    if (f.endsWith(".png") || f.endsWith(".jpg")) {
      const [pa, pb] = [await pixels(join(a, f)), await pixels(join(b, f))];
      let differ = 0, max = 0;
      for (let i = 0; i < pa.length; i++) if (pa[i] !== pb[i]) { differ++; max = Math.max(max, Math.abs(pa[i] - pb[i])); }
      if (pa.length !== pb.length) console.log(`${f}: sizes differ`);
      if (isTile) {
        tileFiles++; tileSamples += pa.length; tileDiffer += differ; tileMax = Math.max(tileMax, max);
        if (differ > 0) tileFilesDiffer++;
      } else console.log(`${f}: ${differ} of ${pa.length} samples differ (at most ${max}); files ${bytesA.length} and ${bytesB.length} bytes${bytesA.equals(bytesB) ? ", identical" : ""}`);
    } else if (f.endsWith("report.json")) {
      console.log(`${f}: ${withoutTimings(bytesA.toString()) === withoutTimings(bytesB.toString()) ? "the same but for timings" : "DIFFERS beyond timings"}`);
    } else if (f.endsWith(".fits")) {
      const [ha, hb] = [fitsHeaderBytes(bytesA), fitsHeaderBytes(bytesB)];
      const cards = (bytes: Buffer, end: number) => bytes.toString("latin1", 0, end).match(/.{80}/g) ?? [];
      const [ca, cb] = [cards(bytesA, ha), cards(bytesB, hb)];
      const changed = ca.filter((card, k) => card !== cb[k]).map((card) => card.slice(0, 8).trim());
      console.log(`${f}: data ${bytesA.subarray(ha).equals(bytesB.subarray(hb)) ? "identical" : "DIFFER"}; header cards that differ: ${changed.join(", ") || "none"}`);
    } else console.log(`${f}: ${bytesA.equals(bytesB) ? "identical" : "DIFFERS"} (${bytesA.length} and ${bytesB.length} bytes)`);
  }
  console.log(`tiles: ${tileFiles} compared, ${tileFilesDiffer} with any different sample; ${tileDiffer} of ${tileSamples} samples differ (${((100 * tileDiffer) / Math.max(1, tileSamples)).toFixed(4)} %), at most by ${tileMax}`);
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});

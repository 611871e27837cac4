// Print-bundle benchmark, without services: one 6000 x 4000 16-bit RGB rendition
// (made here, synthetic), exported for three slots (single column, full width,
// cover) with every variant (sRGB TIFF, JPEG, CMYK TIFF, grey TIFF), metadata
// written by ExifTool, the PDF proof and the ZIP, as bundle.ts does them.
// Prints the time of each part, peak memory, and one ratio measured in this
// same run: the whole export over a floor of sharp decoding the PNG once per
// slot and writing one 16-bit TIFF of the slot's size (what any export of
// these slots must at least do).
// Run: npm run bench -- export
import { createWriteStream } from "node:fs";
import { mkdtemp, readFile, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pipeline } from "node:stream/promises";
import { ZipFile } from "yazl";
import { closeExportExifTool, embedTags } from "@/lib/editions/export/embed";
import { buildPlateMetadata, metadataTags, type ExportPlateInput } from "@/lib/editions/export/metadata";
import { buildProofPdf, type ProofPage } from "@/lib/editions/export/proof";
import { planPrintSize, renderPlateFiles } from "@/lib/editions/export/render";
import { slotWidthPx, SLOT_SPECS, type SlotPreset } from "@/lib/editions/print-sizes";
import { createSharp } from "@/lib/media/sharp-setup";
import { startMemorySampler } from "./bench/memory-sampler";

const W = 6000;
const H = 4000;
const SLOTS: SlotPreset[] = ["single-column", "full-width", "cover"];
const GB = 1024 ** 3;

async function renditionPng(): Promise<Buffer> {
  const px = new Uint16Array(W * H * 3);
  for (let y = 0; y < H; y++)
    for (let x = 0; x < W; x++) {
      const r = Math.hypot(x - W / 2, y - H / 2);
      const v = r < 600 ? 300 : Math.min(65535, Math.round(65535 * (600 / r) ** 2.5 * (1 + 0.2 * Math.sin(Math.atan2(y - H / 2, x - W / 2) * 6))));
      const i = (y * W + x) * 3;
      px[i] = v;
      px[i + 1] = v;
      px[i + 2] = v;
    }
  return createSharp(Buffer.from(px.buffer), { raw: { width: W, height: H, channels: 3 } }).toColourspace("rgb16").png({ compressionLevel: 6 }).toBuffer();
}

const plate: ExportPlateInput = {
  slug: "bench-plate",
  version: 1,
  title: "Benchmark plate (synthetic)",
  caption: "A synthetic corona for the export benchmark.",
  altText: "A dark disk with six pale streamers.",
  acquiredBy: "Bench Observer",
  processedBy: "Crownlight pipeline",
  licence: "CC-BY-4.0",
  creditLine: "Bench Observer / Kestrel Ridge AS",
  societyName: "Kestrel Ridge Astronomical Society",
  plateUrl: "http://127.0.0.1:3000/plates/bench-plate/v/1",
  rendition: "natural",
  eclipseDate: "2027-08-02",
  captureStartUtc: "2027-08-02T10:42:55.000Z",
  captureEndUtc: "2027-08-02T10:43:10.000Z",
  exposuresS: [0.001, 0.01, 0.1, 1],
  kit: { name: "Bench refractor", camera: "Bench camera", focalMm: 500, fNumber: 6.3 },
  site: null,
  sky: { masterWidth: W, masterHeight: H, sunCentrePx: { x: W / 2, y: H / 2 }, plateScaleArcsecPerPx: 1.5, northAngleDeg: 12, referenceUtc: "2027-08-02T10:43:00Z", observer: { latDeg: 25.7, lonDeg: 32.65, elevationM: 80 } },
};

async function main(): Promise<void> {
  const dir = await mkdtemp(join(tmpdir(), "crownlight-bench-export-"));
  try {
    let t = performance.now();
    const source = await renditionPng();
    console.log(`\nCrownlight export benchmark: one ${W} x ${H} 16-bit RGB rendition (${(source.length / 1024 ** 2).toFixed(0)} MB PNG, made in ${((performance.now() - t) / 1000).toFixed(1)} s), slots ${SLOTS.join(", ")}, all variants\n`);
    const sampler = startMemorySampler();
    const times: Record<string, number> = { render: 0, metadata: 0, proof: 0, zip: 0 };
    const started = performance.now();
    const pages: ProofPage[] = [];
    const files: string[] = [];
    for (const slot of SLOTS) {
      const spec = SLOT_SPECS[slot];
      const width = slotWidthPx(slot);
      const plan = planPrintSize({ width, height: Math.round((width * H) / W) }, { width: W, height: H }, { widthMm: spec.widthMm, dpi: spec.dpi });
      t = performance.now();
      const made = await renderPlateFiles(source, "bench natural.png", plan, `bench_${slot}`, dir, { cmyk: true, greyscale: true });
      times.render += performance.now() - t;
      t = performance.now();
      const tags = metadataTags(buildPlateMetadata(plate, plan.width, plan.height), plan.dpi);
      for (const f of made) await embedTags(f.path, tags);
      times.metadata += performance.now() - t;
      files.push(...made.map((f) => f.path));
      pages.push({ position: pages.length + 1, title: plate.title, slotLabel: spec.label, caption: plate.caption, creditLine: plate.creditLine, files: made.map((f) => f.name), jpeg: await readFile(made.find((f) => f.kind === "jpeg")!.path), widthPx: plan.width, heightPx: plan.height, widthMm: plan.widthMm, dpi: plan.dpi, notes: [] });
    }
    t = performance.now();
    await buildProofPdf({ title: "Bench", issueLabel: "", societyName: plate.societyName, embargoDate: null, createdAt: "" }, pages);
    times.proof = performance.now() - t;
    t = performance.now();
    const zip = new ZipFile();
    for (const f of files) zip.addFile(f, f.split("/").at(-1)!, { compress: false });
    zip.end();
    await pipeline(zip.outputStream, createWriteStream(join(dir, "bundle.zip")));
    times.zip = performance.now() - t;
    const wallMs = performance.now() - started;
    const peak = await sampler.stop();

    t = performance.now();
    for (const slot of SLOTS) {
      const width = slotWidthPx(slot);
      await createSharp(source).resize({ width }).toColourspace("rgb16").tiff({ compression: "lzw" }).toFile(join(dir, `floor_${slot}.tif`));
    }
    const floorMs = performance.now() - t;

    for (const [part, ms] of Object.entries(times)) console.log(`  ${part.padEnd(10)} ${ms.toFixed(0).padStart(7)} ms`);
    console.log(`  ${"total".padEnd(10)} ${wallMs.toFixed(0).padStart(7)} ms for ${SLOTS.length} plates, ${files.length} image files`);
    console.log(`peak RSS during the export ${(peak / GB).toFixed(2)} GB (whole process)`);
    console.log(`floor: sharp decode + one 16-bit LZW TIFF per slot = ${floorMs.toFixed(0)} ms`);
    console.log(`export / floor = ${(wallMs / floorMs).toFixed(2)}  (four variants, metadata, proof and ZIP over one TIFF each)`);
    console.log(JSON.stringify({ bench: "export", width: W, height: H, slots: SLOTS, partsMs: Object.fromEntries(Object.entries(times).map(([k, v]) => [k, Math.round(v)])), wallMs: Math.round(wallMs), floorMs: Math.round(floorMs), ratioToFloor: Number((wallMs / floorMs).toFixed(3)), peakRssBytes: peak }));
  } finally {
    await closeExportExifTool();
    await rm(dir, { recursive: true, force: true });
  }
}

main().catch((error: unknown) => {
  console.error(error instanceof Error ? error.stack : error);
  process.exitCode = 1;
});

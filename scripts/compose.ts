// Composes two or more finished masters (FITS with a helioprojective WCS) into
// one Sun-centred composite in a new output folder.
// Run: npm run compose -- --out DIR [--scale ARCSEC_PER_PX] [--no-refine] [--filter mgn|nrgf] MASTER.fits MASTER.fits...
// Progress goes to stderr; exit 2 for bad input (the message names the file or
// option), 1 for anything else.
import { discardActiveStagingSync } from "@/lib/reduction-runner";
import { isCompositeInputError, parseComposeArgs, runCompositeOnFiles } from "@/lib/composite-runner";

function createProgressPrinter(): (stage: string, fraction: number) => void {
  let last = "";
  return (stage, fraction) => {
    const line = `${stage.padEnd(12)} ${String(Math.round(fraction * 10) * 10).padStart(3)} %`;
    if (line === last) return;
    last = line;
    process.stderr.write(`${line}\n`);
  };
}

async function main(): Promise<void> {
  const args = parseComposeArgs(process.argv.slice(2));
  const { outDir, report } = await runCompositeOnFiles({ ...args, onProgress: createProgressPrinter() });
  const g = report.grid;
  console.log(`${report.inputs.length} masters composed into ${outDir}: ${g.width} x ${g.height} px at ${g.scaleArcsecPerPx.toFixed(3)} arcsec/px, solar north up (${report.timingsMs.total} ms, peak ${(report.peakRssBytes / 1024 ** 3).toFixed(2)} GB)`);
  for (const input of report.inputs) {
    const factor = input.factors.map((f) => f.toPrecision(4)).join("/");
    const where = input.isReference ? "reference" : input.refinement.applied ? `WCS off by ${Math.hypot(input.refinement.lonArcsec, input.refinement.latArcsec).toFixed(2)} arcsec, corrected` : "placed by its WCS";
    console.log(`  ${input.name}: ${input.scaleArcsecPerPx.toFixed(3)} arcsec/px, out to ${input.fieldR.outer} solar radii, factor ${factor}, ${where}, ${(100 * input.weightShare).toFixed(1)} % of the weight`);
  }
  for (const note of report.notes) console.log(note);
}

for (const signal of ["SIGINT", "SIGTERM"] as const) {
  process.on(signal, () => {
    discardActiveStagingSync();
    process.stderr.write(`stopped by ${signal}; nothing was written\n`);
    process.exit(130);
  });
}

main().catch((error: unknown) => {
  process.stderr.write(`${error instanceof Error ? error.message : String(error)}\n`);
  process.exitCode = isCompositeInputError(error) ? 2 : 1;
});

// One of the processes that make a scale bracket's frames side by side (scale-bracket.ts
// starts them): makes its share of the passes and prints one JSON line per frame written.
import { makeScaleFrames, type ScaleSize } from "./scale-bracket";

const job = JSON.parse(process.argv[2] ?? "{}") as { dir: string; size: ScaleSize; total: number; share: { index: number; count: number } };
await makeScaleFrames(job.dir, job.size, job.total, job.share, (index, frame) => process.stdout.write(`${JSON.stringify({ index, ...frame })}\n`));

import { mkdir, mkdtemp, readdir, readFile, rm } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { UnrecoverableError } from "bullmq";
import { eq, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { bracketSets, jobRuns, kits, reductions, sites } from "@/db/schema";
import { ImagingError } from "@/lib/imaging/errors";
import type { FrameCount } from "@/lib/imaging/types";
import { MediaError } from "@/lib/media/errors";
import { ReductionInputError } from "@/lib/reduction-runner/errors";
import { runReductionOnFiles, type RunReductionOptions } from "@/lib/reduction-runner/run-reduction";
import type { SkyOptions } from "@/lib/reduction-runner/sky-run";
import { AppError } from "@/lib/errors";
import { JOBS } from "@/lib/queue/jobs";
import { describeReductionFailure } from "@/lib/reductions/failure-text";
import { notifyReductionOutcome, selectReductionFrames, type StoredReductionParams } from "@/lib/reductions/reductions";
import { buildDerivedPrefix, toSafeFileName } from "@/lib/storage/keys";
import { downloadObjectToFile, putObjectBytes } from "@/lib/storage/objects";
import { findCalibrationFrames, findCalibrationMismatch } from "@/lib/reductions/calibration-frames";
import { bucketName } from "@/lib/storage/s3";
import type { JobHandler } from "../registry";

const CONTENT_TYPES: Record<string, string> = {
  ".fits": "application/fits",
  ".png": "image/png",
  ".jpg": "image/jpeg",
  ".json": "application/json",
  ".dzi": "application/xml",
};

async function listFiles(dir: string, prefix = ""): Promise<string[]> {
  const out: string[] = [];
  for (const e of await readdir(dir, { withFileTypes: true })) {
    const rel = prefix ? `${prefix}/${e.name}` : e.name;
    if (e.isDirectory()) out.push(...(await listFiles(path.join(dir, e.name), rel)));
    else out.push(rel);
  }
  return out;
}

/** True when this run is the job's last attempt (the worker mirrors the attempt number before the handler starts). */
async function isLastAttempt(db: DbOrTx, jobId: string): Promise<boolean> {
  const [run] = await db.select({ attempts: jobRuns.attempts }).from(jobRuns).where(eq(jobRuns.id, jobId)).limit(1);
  return (run?.attempts ?? 0) >= JOBS["reduction.run"].attempts;
}

/** Marks the reduction failed for good and tells the photographer why. */
async function failForGood(db: DbOrTx, reductionId: string, reason: string): Promise<void> {
  await db.update(reductions).set({ state: "failed", error: reason, finishedAt: sql`now()` }).where(eq(reductions.id, reductionId));
  await notifyReductionOutcome(db, reductionId);
}

/**
 * Runs one reduction: the included, ingested light frames of the chosen group
 * (selectReductionFrames, the same choice the start form checked) and the set's
 * included, ingested bias, dark and flat frames (findCalibrationFrames) are
 * fetched from S3, reduced by the imaging core, and every output is stored under the
 * reduction's own prefix. A reduction already done is left alone (a repeated
 * job changes nothing); a retried one rewrites the same keys, so nothing is
 * duplicated. Originals are only read.
 */
export const runReduction: JobHandler<"reduction.run"> = async ({ db, jobId, payload, report }) => {
  const [red] = await db.select().from(reductions).where(eq(reductions.id, payload.reductionId)).limit(1);
  if (!red) throw new UnrecoverableError(`reduction ${payload.reductionId} does not exist`);
  // A repeated job finds the work done; the mail, if a crash came between the two, still goes (once).
  if (red.state === "done") return notifyReductionOutcome(db, red.id);
  const [set] = await db.select().from(bracketSets).where(eq(bracketSets.id, red.bracketSetId)).limit(1);
  if (!set) throw new UnrecoverableError(`the bracket set of reduction ${red.id} is gone`);
  const [site] = await db.select().from(sites).where(eq(sites.id, set.siteId)).limit(1);
  const [kit] = set.kitId ? await db.select().from(kits).where(eq(kits.id, set.kitId)).limit(1) : [];
  const params: StoredReductionParams = red.params;
  let frameRows: Awaited<ReturnType<typeof selectReductionFrames>>;
  let calibrationRows: Awaited<ReturnType<typeof findCalibrationFrames>>;
  try {
    frameRows = await selectReductionFrames(db, set, params.groupNumber ?? null);
    calibrationRows = await findCalibrationFrames(db, set.id);
    const mismatch = findCalibrationMismatch(frameRows, calibrationRows);
    if (mismatch) throw new AppError("invalid_input", mismatch);
  } catch (err) {
    // Frames excluded or regrouped since the start, or calibration frames that do not fit the lights: bad input, no retry.
    if (err instanceof AppError) {
      await failForGood(db, red.id, err.message);
      throw new UnrecoverableError(err.message);
    }
    throw err;
  }

  const setProgress = async (stage: string, fraction: number, frames?: FrameCount) => {
    await db.update(reductions).set({ stage, progress: fraction, stageFramesDone: frames?.done ?? null, stageFramesTotal: frames?.total ?? null }).where(eq(reductions.id, red.id));
    await report(stage, fraction);
  };
  await db.update(reductions).set({ state: "running", startedAt: sql`now()`, error: null, progress: 0 }).where(eq(reductions.id, red.id));

  const work = await mkdtemp(path.join(os.tmpdir(), "crownlight-reduction-"));
  try {
    await setProgress("fetch", 0);
    await mkdir(path.join(work, "in"));
    const files: string[] = [];
    const overrides = new Map<string, number>();
    const captureTimes = new Map<string, number>();
    const frameIds: Record<string, string> = {};
    const seen = new Set<string>();
    for (const [i, f] of frameRows.entries()) {
      // Names must be unique in a bracket; the report names frames by them.
      let name = toSafeFileName(f.originalFileName);
      if (seen.has(name)) name = `${f.id.slice(0, 8)}-${name}`;
      seen.add(name);
      const local = path.join(work, "in", name);
      await downloadObjectToFile({ bucket: bucketName("originals"), key: f.originalKey }, local);
      files.push(local);
      frameIds[name] = f.id;
      if (f.exposureSource === "photographer" && f.exposureS !== null) overrides.set(name, f.exposureS);
      // Camera-clock times the photographer gave; the set's clock offset applies to them as to the files' own.
      if (f.givenCaptureAt) captureTimes.set(name, f.givenCaptureAt.getTime());
      await setProgress("fetch", (i + 1) / frameRows.length, { done: i + 1, total: frameRows.length });
    }
    // The set's calibration frames (bias, dark, flat) go into the same folder, after the lights: names stay
    // unique across all, and the photographer's exposure corrections reach a dark as they reach a light.
    const calibrationFiles: NonNullable<RunReductionOptions["calibrationFiles"]> = { bias: [], dark: [], flat: [] };
    for (const f of calibrationRows) {
      let name = toSafeFileName(f.originalFileName);
      if (seen.has(name)) name = `${f.id.slice(0, 8)}-${name}`;
      seen.add(name);
      const local = path.join(work, "in", name);
      await downloadObjectToFile({ bucket: bucketName("originals"), key: f.originalKey }, local);
      calibrationFiles[f.kind].push(local);
      frameIds[name] = f.id;
      if (f.exposureSource === "photographer" && f.exposureS !== null) overrides.set(name, f.exposureS);
    }

    const sky: SkyOptions | undefined = site
      ? {
          site: site.kind === "moving" && site.track ? { kind: "track", points: site.track, source: site.trackFileName ?? site.name } : { kind: "fixed", location: { latDeg: site.latDeg, lonDeg: site.lonDeg, elevationM: site.elevationM } },
          clockOffsetS: set.clockOffsetS,
          camera: kit ? { mount: kit.mount, flipHorizontal: kit.flipHorizontal, flipVertical: kit.flipVertical } : undefined,
          // A north angle the photographer gave wins over the mount's.
          ...(set.northAngleDeg !== null ? { northAngleDeg: set.northAngleDeg } : {}),
        }
      : undefined;

    const outDir = path.join(work, "out");
    let last = 0;
    const runnerParams = { filter: params.filter, recoverResponse: params.recoverResponse, filterStrength: params.filterStrength };
    const options: RunReductionOptions = {
      files,
      outDir,
      params: runnerParams,
      outputLongSidePx: params.outputLongSidePx,
      // The report names each frame by its file here; the ids let pages find the frame rows.
      frameIds,
      registration: params.registration,
      sky,
      calibrationFiles: calibrationRows.length > 0 ? calibrationFiles : undefined,
      exposureOverrides: overrides,
      captureTimeOverrides: captureTimes,
      exposureOverrideSource: "the photographer's corrections",
      // IIIF ids name where the app serves this reduction's tiles, not the worker's temporary folder.
      iiifBaseUrl: `${(process.env.APP_URL ?? "").replace(/\/+$/, "")}/iiif/reductions/${red.id}`,
      onProgress: (stage: string, fraction: number, frames?: FrameCount) => {
        // Mirror at most every 2 %, without awaiting inside the pipeline's loop.
        if (fraction - last >= 0.02 || fraction === 1 || fraction === 0) {
          last = fraction;
          void setProgress(stage, fraction, frames).catch(() => undefined);
        }
      },
    };
    const result = await runReductionOnFiles(options);

    await setProgress("store", 0);
    const prefix = `${buildDerivedPrefix(set.id)}reductions/${red.id}/`;
    const outputs = await listFiles(outDir);
    for (const [i, rel] of outputs.entries()) {
      const type = CONTENT_TYPES[path.extname(rel).toLowerCase()] ?? "application/octet-stream";
      await putObjectBytes({ bucket: bucketName("derived"), key: prefix + rel }, await readFile(path.join(outDir, rel)), type);
      if (i % 20 === 0) await setProgress("store", i / outputs.length);
    }
    const overall = result.report.overall as Record<string, unknown>;
    await db
      .update(reductions)
      .set({
        state: "done",
        stage: "done",
        progress: 1,
        finishedAt: sql`now()`,
        pipelineVersion: result.report.pipelineVersion,
        outputs: {
          prefix,
          master: `${prefix}master.fits`,
          natural: `${prefix}natural.png`,
          structure: `${prefix}structure.png`,
          preview: `${prefix}preview.jpg`,
          report: `${prefix}report.json`,
          tiles: `${prefix}tiles/`,
        },
        measurements: { ...overall, parameters: result.report.parameters, timingsMs: result.report.timingsMs },
      })
      .where(eq(reductions.id, red.id));
  } catch (err) {
    // Bad input fails at once with its reason; anything else is retried by the queue, until the last attempt.
    if (err instanceof ReductionInputError || err instanceof ImagingError || err instanceof MediaError) {
      // People read the reason on the page and in the mail: in their words, never the command line's.
      await failForGood(db, red.id, describeReductionFailure(err));
      throw new UnrecoverableError(err.message);
    }
    if (await isLastAttempt(db, jobId)) {
      await failForGood(db, red.id, `${(err as Error).message} (after ${JOBS["reduction.run"].attempts} attempts)`);
      throw err;
    }
    await db.update(reductions).set({ state: "queued", error: (err as Error).message }).where(eq(reductions.id, red.id));
    throw err;
  } finally {
    await rm(work, { recursive: true, force: true });
  }
  // Outside the try: a fault in queueing the mail must not put a finished reduction back in the queue.
  // A retry finds the reduction done and queues the mail then (once).
  await notifyReductionOutcome(db, red.id);
};

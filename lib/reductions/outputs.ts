// Reading a reduction's outputs: one file streamed from S3 for the files route,
// and the parsed report for the reduction page. Visible exactly when the
// reduction is (its bracket set's owner and curators); to anyone else a
// reduction answers "not found", like one that does not exist.
import { GetObjectCommand } from "@aws-sdk/client-s3";
import { eq } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { bracketSets, frames, reductions } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { findVisibleSet } from "@/lib/bracket-sets/access";
import { AppError, notFound } from "@/lib/errors";
import { bucketName, getS3, isMissingObject, openObjectStream, toSafeFileName } from "@/lib/storage";
import { buildOutputDownloadName, findOutputContentType, isReductionOutputPath } from "./output-paths";
import { parseReportView, type ReductionReportView } from "./report-view";

const REDUCTION_NOT_FOUND = "That reduction";

interface VisibleOutputs {
  setId: string;
  setName: string;
  state: string;
  /** Key prefix of the outputs; null until the reduction is done. */
  prefix: string | null;
}

async function findVisibleOutputs(db: DbOrTx, actor: Actor | null, reductionId: string): Promise<VisibleOutputs> {
  if (!z.uuid().safeParse(reductionId).success) throw notFound(REDUCTION_NOT_FOUND);
  const [row] = await db
    .select({ setId: reductions.bracketSetId, state: reductions.state, outputs: reductions.outputs })
    .from(reductions)
    .where(eq(reductions.id, reductionId))
    .limit(1);
  if (!row) throw notFound(REDUCTION_NOT_FOUND);
  // Visible exactly when its bracket set is (the same rule as findReduction).
  const { set } = await findVisibleSet(db, actor, row.setId).catch((err: unknown) => {
    if (err instanceof AppError && err.code !== "not_found") throw err;
    throw notFound(REDUCTION_NOT_FOUND);
  });
  const prefix = row.state === "done" && typeof row.outputs?.prefix === "string" ? row.outputs.prefix : null;
  return { setId: row.setId, setName: set.name, state: row.state, prefix };
}

export interface ReductionOutputFile {
  body: ReadableStream<Uint8Array>;
  contentType: string;
  contentLength?: number;
  etag?: string;
  downloadName: string;
}

/** One output of a finished reduction, streamed from S3. */
export async function openReductionOutput(db: DbOrTx, actor: Actor | null, reductionId: string, path: string): Promise<ReductionOutputFile> {
  if (!isReductionOutputPath(path)) {
    throw new AppError("invalid_input", `"${path.slice(0, 80)}" is not one of a reduction's files: expected master.fits, natural.png, structure.png, preview.jpg, preview-structure.jpg, coverage.png, report.json or a tile under tiles/.`);
  }
  const found = await findVisibleOutputs(db, actor, reductionId);
  if (!found.prefix) throw notFound(`The files of this reduction (it is ${found.state})`);
  const file = await openObjectStream({ bucket: bucketName("derived"), key: found.prefix + path });
  if (!file) throw notFound(`The file ${path} of this reduction`);
  return { ...file, contentType: findOutputContentType(path), downloadName: buildOutputDownloadName(found.setName, reductionId, path) };
}

export interface FrameRef {
  id: string;
  originalFileName: string;
}

export interface ReductionOutputsView {
  setId: string;
  setName: string;
  /** Parsed report.json; null while the reduction is not done or when the report cannot be read. */
  report: ReductionReportView | null;
  /** Why report is null when the reduction is done. */
  reportProblem: string | null;
  /** Frame ids by the names the report gives frames. */
  frameIdsByName: Record<string, string>;
}

/**
 * What the reduction page shows beyond the reduction's own row: the set's
 * name, the report and the frame each report entry names. The worker names
 * frames by their safe file name (with the frame id's first 8 characters in
 * front when two files share a name); a report that carries frame ids wins.
 */
export async function findReductionOutputsView(db: DbOrTx, actor: Actor | null, reductionId: string): Promise<ReductionOutputsView> {
  const found = await findVisibleOutputs(db, actor, reductionId);
  const [set] = await db.select({ name: bracketSets.name }).from(bracketSets).where(eq(bracketSets.id, found.setId)).limit(1);
  const view: ReductionOutputsView = { setId: found.setId, setName: set?.name ?? found.setName, report: null, reportProblem: null, frameIdsByName: {} };
  if (!found.prefix) return view;
  try {
    const out = await getS3().send(new GetObjectCommand({ Bucket: bucketName("derived"), Key: `${found.prefix}report.json` }));
    const text = out.Body ? await out.Body.transformToString("utf8") : "";
    view.report = parseReportView(JSON.parse(text));
  } catch (err) {
    if (!isMissingObject(err) && !(err instanceof SyntaxError)) throw err;
    view.reportProblem = isMissingObject(err) ? "report.json is missing from the reduction's files." : "report.json could not be read as JSON.";
    return view;
  }
  const rows: FrameRef[] = await db.select({ id: frames.id, originalFileName: frames.originalFileName }).from(frames).where(eq(frames.bracketSetId, found.setId));
  const byId = new Map(rows.map((r) => [r.id, r]));
  for (const f of view.report.frames) {
    const direct = f.frameId && byId.has(f.frameId) ? f.frameId : null;
    const match = direct ?? rows.find((r) => toSafeFileName(r.originalFileName) === f.name || `${r.id.slice(0, 8)}-${toSafeFileName(r.originalFileName)}` === f.name)?.id;
    if (match) view.frameIdsByName[f.name] = match;
  }
  return view;
}

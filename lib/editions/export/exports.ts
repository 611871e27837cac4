// Print bundles of an edition, for editors (editions:use) only: start one
// (checked before it is queued, so the editor hears of a missing slot at once),
// follow its progress, list the bundles, download one, and reopen an exported
// edition for changes (its bundles stay). The work itself is bundle.ts, run by
// the worker's edition.export job on the "export" queue (its states: run.ts).
import { and, desc, eq, sql } from "drizzle-orm";
import { z } from "zod";
import type { Db, DbOrTx } from "@/db/client";
import { editionExports, editionItems, editions, plates, type ExportFileEntry, type ExportState } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { AppError, notFound } from "@/lib/errors";
import { enqueue } from "@/lib/queue/enqueue";
import { bucketName, openObjectStream } from "@/lib/storage";
import { parseInput } from "@/lib/validation";
import { checkTemplate, DEFAULT_FILE_NAME_TEMPLATE } from "../file-names";
import { findEditionRow, lockEdition } from "../guards";
import { findActiveExport } from "./active";

const EDITION = "That edition";
const EXPORT = "That print bundle";

// A checkbox sends "on" or nothing; JSON sends true or false. Anything else is refused by name.
const flag = z.preprocess(
  (v) => (v === "on" || v === "true" ? true : v === "false" ? false : v),
  z.boolean({ error: 'expected true or false (or "on" from a checkbox)' }).default(false),
);

export const startExportSchema = z.object({
  cmyk: flag,
  greyscale: flag,
  fileNameTemplate: z
    .string({ error: "expected a file name template" })
    .trim()
    .max(120, { error: "at most 120 characters" })
    .default(DEFAULT_FILE_NAME_TEMPLATE)
    .transform((s) => s || DEFAULT_FILE_NAME_TEMPLATE)
    .superRefine((s, ctx) => {
      const problem = checkTemplate(s);
      if (problem) ctx.addIssue({ code: "custom", message: problem });
    }),
});

export interface ExportDto {
  id: string;
  state: ExportState;
  progress: number;
  stage: string | null;
  options: { cmyk: boolean; greyscale: boolean; fileNameTemplate: string };
  zipName: string | null;
  bytes: number | null;
  fileCount: number | null;
  files: ExportFileEntry[] | null;
  warnings: string[];
  error: string | null;
  createdAt: string;
  finishedAt: string | null;
  downloadUrl: string | null;
}

const isUuid = (id: string) => z.uuid().safeParse(id).success;

function toDto(editionId: string, r: typeof editionExports.$inferSelect): ExportDto {
  return {
    id: r.id,
    state: r.state,
    progress: r.progress,
    stage: r.stage,
    options: r.options,
    zipName: r.zipName,
    bytes: r.bytes,
    fileCount: r.files ? r.files.length + 1 : null,
    files: r.files,
    warnings: r.warnings,
    error: r.error,
    createdAt: r.createdAt.toISOString(),
    finishedAt: r.finishedAt?.toISOString() ?? null,
    downloadUrl: r.state === "done" ? `/api/editions/${editionId}/exports/${r.id}/download` : null,
  };
}

/** Checks the edition can be exported and queues the job; one export at a time per edition. */
export async function startExport(db: Db, actor: Actor | null, editionId: string, input: unknown): Promise<ExportDto> {
  const editor = requirePermission(actor, "editions:use", "exporting editions");
  const options = parseInput(startExportSchema, input);
  const row = await db.transaction(async (tx) => {
    if (!isUuid(editionId)) throw notFound(EDITION);
    const [edition] = await tx.select({ id: editions.id, title: editions.title }).from(editions).where(eq(editions.id, editionId)).for("update");
    if (!edition) throw notFound(EDITION);
    const items = await tx
      .select({ position: editionItems.position, slot: editionItems.slot, w: editionItems.customWidthMm, dpi: editionItems.customDpi, title: plates.title, state: plates.state })
      .from(editionItems)
      .innerJoin(plates, eq(plates.id, editionItems.plateId))
      .where(eq(editionItems.editionId, editionId));
    if (items.length === 0) throw new AppError("conflict", `"${edition.title}" has no plates yet: add at least one before exporting.`);
    const incomplete = items.filter((i) => i.slot === "custom" && (i.w === null || i.dpi === null));
    if (incomplete.length) throw new AppError("conflict", `Plate ${incomplete[0].position} ("${incomplete[0].title}") has a custom slot without a width or dpi.`);
    const gone = items.filter((i) => i.state !== "published");
    if (gone.length) throw new AppError("conflict", `Plate ${gone[0].position} ("${gone[0].title}") is ${gone[0].state} now: remove it before exporting.`);
    if (await findActiveExport(tx, editionId)) throw new AppError("conflict", `An export of "${edition.title}" is already under way; wait for it to finish.`);
    const [created] = await tx.insert(editionExports).values({ editionId, options, requestedBy: editor.userId, stage: "Waiting for the worker" }).returning();
    await recordAudit(tx, { actorId: editor.userId, action: "edition.export-started", subjectType: "edition", subjectId: editionId, detail: { exportId: created.id, ...options } });
    return created;
  });
  try {
    await enqueue(db, "edition.export", { exportId: row.id });
  } catch (err) {
    await db.update(editionExports).set({ state: "failed", error: "The job queue could not be reached; try again in a moment.", finishedAt: sql`now()` }).where(eq(editionExports.id, row.id));
    throw err;
  }
  return toDto(editionId, row);
}

export async function listExports(db: Db, actor: Actor | null, editionId: string): Promise<ExportDto[]> {
  requirePermission(actor, "editions:use", "print bundles");
  await findEditionRow(db, editionId);
  // Settles an export whose job the queue gave up on, so the list does not show it running for ever.
  await findActiveExport(db, editionId);
  const rows = await db.select().from(editionExports).where(eq(editionExports.editionId, editionId)).orderBy(desc(editionExports.createdAt)).limit(50);
  return rows.map((r) => toDto(editionId, r));
}

async function findRow(db: DbOrTx, editionId: string, exportId: string) {
  if (!isUuid(editionId) || !isUuid(exportId)) throw notFound(EXPORT);
  const [row] = await db
    .select()
    .from(editionExports)
    .where(and(eq(editionExports.id, exportId), eq(editionExports.editionId, editionId)))
    .limit(1);
  if (!row) throw notFound(EXPORT);
  return row;
}

export async function findExport(db: Db, actor: Actor | null, editionId: string, exportId: string): Promise<ExportDto> {
  requirePermission(actor, "editions:use", "print bundles");
  return toDto(editionId, await findRow(db, editionId, exportId));
}

export interface ExportDownload {
  body: ReadableStream<Uint8Array>;
  contentLength?: number;
  fileName: string;
}

/** The finished ZIP, streamed from the exports bucket. */
export async function openExportDownload(db: Db, actor: Actor | null, editionId: string, exportId: string): Promise<ExportDownload> {
  requirePermission(actor, "editions:use", "print bundles");
  const row = await findRow(db, editionId, exportId);
  if (row.state !== "done" || !row.objectKey || !row.zipName) throw new AppError("conflict", `That print bundle is ${row.state}; it can be downloaded once it is done.`);
  const out = await openObjectStream({ bucket: bucketName("exports"), key: row.objectKey });
  if (!out) throw notFound("The ZIP of that print bundle");
  return { body: out.body, contentLength: out.contentLength, fileName: row.zipName };
}

/** An exported edition back to draft, so its plates can change; its bundles stay. */
export async function reopenEdition(db: Db, actor: Actor | null, editionId: string): Promise<{ state: "draft" }> {
  const editor = requirePermission(actor, "editions:use", "reopening editions");
  await db.transaction(async (tx) => {
    const edition = await lockEdition(tx, editionId);
    if (edition.state === "draft") return;
    await tx.update(editions).set({ state: "draft", updatedAt: sql`now()` }).where(eq(editions.id, editionId));
    await recordAudit(tx, { actorId: editor.userId, action: "edition.reopened", subjectType: "edition", subjectId: editionId, detail: {} });
  });
  return { state: "draft" };
}

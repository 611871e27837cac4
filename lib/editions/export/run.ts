// An export's lifecycle in the worker: the edition.export job takes an export
// still under way (running), makes its bundle (bundle.ts), and records it done
// (the edition exported) or failed, or queued again for a retry; the editor is
// mailed the outcome. The job's handler only calls runExportJob. An export the
// queue gave up on without running this (stalled) is settled by active.ts.
import { UnrecoverableError } from "bullmq";
import { and, eq, inArray, sql } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { editionExports, editions, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { appLink } from "@/lib/email/app-link";
import { sendStagedMail, stageMail } from "@/lib/email/outbox";
import { editionExportFailedMail, editionExportReadyMail } from "@/lib/email/templates";
import { AppError } from "@/lib/errors";
import { formatBytes } from "@/lib/format/bytes";
import { MediaError } from "@/lib/media/errors";
import type { BasicJobContext } from "@/lib/queue/job-context";
import { makeBundle, type BundleResult } from "./bundle";

/** States of an export under way: only these move on. */
const ACTIVE = ["queued", "running"] as const;

/**
 * The edition.export job. A bundle already done is left alone; bad data (a
 * plate withdrawn since, a rendition missing, an unreadable image, a template
 * that cannot be followed) fails the export at once with the reason; anything
 * else is retried, and fails the export on the last attempt. The edition
 * changes only when the ZIP is stored.
 */
export async function runExportJob(ctx: BasicJobContext<{ exportId: string }>): Promise<void> {
  const { db, payload, report } = ctx;
  const { exportId } = payload;
  const [row] = await db.select({ state: editionExports.state }).from(editionExports).where(eq(editionExports.id, exportId)).limit(1);
  if (!row) throw new UnrecoverableError(`export ${exportId} does not exist`);
  // Only an export still under way is taken: a finished or failed one, or one another run took meanwhile, is left alone.
  const [taken] = await db
    .update(editionExports)
    .set({ state: "running", startedAt: sql`now()`, error: null })
    .where(and(eq(editionExports.id, exportId), inArray(editionExports.state, ACTIVE)))
    .returning({ id: editionExports.id });
  if (!taken) return;
  const progress = async (stage: string, fraction: number) => {
    await db.update(editionExports).set({ stage, progress: fraction }).where(and(eq(editionExports.id, exportId), eq(editionExports.state, "running")));
    await report(stage, fraction);
  };
  let result: BundleResult;
  try {
    result = await makeBundle(db, exportId, progress);
  } catch (err) {
    if (err instanceof AppError || err instanceof MediaError) {
      await failExport(db, exportId, err.message);
      throw new UnrecoverableError(err.message);
    }
    if (ctx.isFinalAttempt) {
      await failExport(db, exportId, `the bundle could not be made (${err instanceof Error ? err.message : String(err)})`);
    } else {
      await db.update(editionExports).set({ state: "queued", stage: "Retrying after an error" }).where(and(eq(editionExports.id, exportId), eq(editionExports.state, "running")));
    }
    throw err;
  }
  await finishExport(db, exportId, result);
}

type ExportOutcome = { ok: true; bytes: number; plates: number } | { ok: false; reason: string };

/**
 * Marks the export done and the edition exported, with the audit entry and the
 * editor's mail, in one transaction; only an export still under way changes (a
 * repeated call does nothing).
 */
async function finishExport(db: Db, exportId: string, result: BundleResult): Promise<void> {
  const mailIds = await db.transaction(async (tx) => {
    const [done] = await tx
      .update(editionExports)
      .set({ state: "done", progress: 1, stage: "Ready", objectKey: result.objectKey, zipName: result.zipName, bytes: result.bytes, files: result.files, warnings: result.warnings, error: null, finishedAt: sql`now()` })
      .where(and(eq(editionExports.id, exportId), inArray(editionExports.state, ACTIVE)))
      .returning({ editionId: editionExports.editionId, requestedBy: editionExports.requestedBy });
    if (!done) return [];
    await tx.update(editions).set({ state: "exported", updatedAt: sql`now()` }).where(eq(editions.id, done.editionId));
    await recordAudit(tx, { actorId: done.requestedBy, action: "edition.exported", subjectType: "edition", subjectId: done.editionId, detail: { exportId, bytes: result.bytes, files: result.files.length } });
    return stageExportMail(tx, exportId, done, { ok: true, bytes: result.bytes, plates: result.plates });
  });
  await sendExportMail(db, exportId, mailIds);
}

/** Marks an export under way as failed with its reason (a finished one stays finished) and tells the editor. */
async function failExport(db: Db, exportId: string, reason: string): Promise<void> {
  const mailIds = await db.transaction(async (tx) => {
    const [failed] = await tx
      .update(editionExports)
      .set({ state: "failed", error: reason, stage: "Failed", finishedAt: sql`now()` })
      .where(and(eq(editionExports.id, exportId), inArray(editionExports.state, ACTIVE)))
      .returning({ editionId: editionExports.editionId, requestedBy: editionExports.requestedBy });
    return failed ? stageExportMail(tx, exportId, failed, { ok: false, reason }) : [];
  });
  await sendExportMail(db, exportId, mailIds);
}

/** Stages the mail that tells the editor who started the export its outcome; one message per export and outcome. */
async function stageExportMail(tx: DbOrTx, exportId: string, row: { editionId: string; requestedBy: string | null }, outcome: ExportOutcome): Promise<string[]> {
  if (!row.requestedBy) return [];
  const [user] = await tx.select({ name: users.name, email: users.email }).from(users).where(eq(users.id, row.requestedBy)).limit(1);
  const [edition] = await tx.select({ title: editions.title }).from(editions).where(eq(editions.id, row.editionId)).limit(1);
  if (!user || !edition) return [];
  const society = (await findSocietySettings(tx)).name;
  const url = appLink(`/editions/${row.editionId}#exports-h`);
  const message = outcome.ok
    ? { id: `edition-export-ready-${exportId}`, ...editionExportReadyMail(society, user.email, user.name, { title: edition.title, plates: outcome.plates, size: formatBytes(outcome.bytes), url }) }
    : { id: `edition-export-failed-${exportId}`, ...editionExportFailedMail(society, user.email, user.name, { title: edition.title, reason: outcome.reason, url }) };
  return [await stageMail(tx, message)];
}

async function sendExportMail(db: Db, exportId: string, mailIds: string[]): Promise<void> {
  try {
    await sendStagedMail(db, mailIds);
  } catch (err) {
    // The bundle's state is already recorded; a mail that could not be queued stays pending in the outbox.
    console.error(`[edition-export] the e-mail about export ${exportId} could not be queued:`, err);
  }
}

// Reports from the public about a plate: a visitor (no account) says there is
// a rights question, an error or something else; curators are e-mailed, see
// the open reports in the plate editor and answer by e-mail. The answer is kept.
import { and, asc, desc, eq, inArray } from "drizzle-orm";
import type { Db } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { plateReports, plates, userRoles, users, type PlateReportKind, type PlateReportState } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import type { Actor } from "@/lib/auth/actor";
import { appLink } from "@/lib/email/app-link";
import { sendStagedMail, stageMail } from "@/lib/email/outbox";
import { plateReportAnswerMail, plateReportedMail } from "@/lib/email/templates";
import { AppError, notFound } from "@/lib/errors";
import { parseInput } from "@/lib/validation";
import { plateReportSchema, reportAnswerSchema } from "./desk-input";
import { requireCurator } from "./desk";

/** Reports per client address: generous for people, tight for scripts. */
export const REPORT_RATE = { window: 600, max: 5 } as const;
/** Reports about one plate from everyone together, so that many addresses cannot flood it either. */
export const PLATE_REPORT_RATE = { window: 3600, max: 20 } as const;
/**
 * Curators are e-mailed about the first report on a plate in this window; the
 * reports that follow within it are kept and listed in the plate editor (the
 * mail says so), so a burst of reports about one plate sends one e-mail.
 */
export const REPORT_MAIL_WINDOW_S = 15 * 60;

export interface RateLimiter {
  consume(key: string, rule: { window: number; max: number }): Promise<{ allowed: boolean; retryAfter: number | null }>;
}

export interface PlateReportDto {
  id: string;
  kind: PlateReportKind;
  message: string;
  reporterEmail: string;
  state: PlateReportState;
  answer: string | null;
  answeredAt: string | null;
  answeredByName: string | null;
  createdAt: string;
}

/**
 * A visitor's report on a plate the public can see (published, or withdrawn
 * with its page kept). Rate-limited per client address and per plate; curators
 * are e-mailed about the first report in a quiet window (REPORT_MAIL_WINDOW_S).
 */
export async function submitPlateReport(db: Db, slug: string, input: unknown, client: { address: string; limiter: RateLimiter }): Promise<{ id: string }> {
  const values = parseInput(plateReportSchema, input);
  const [plate] = await db
    .select({ id: plates.id, title: plates.title })
    .from(plates)
    .where(and(eq(plates.slug, slug), inArray(plates.state, ["published", "withdrawn"])))
    .limit(1);
  if (!plate) throw notFound("That plate");
  const fromClient = await client.limiter.consume(`plate-report:${client.address}`, REPORT_RATE);
  if (!fromClient.allowed) {
    throw new AppError("rate_limited", `Too many reports from your address; try again in ${Math.ceil((fromClient.retryAfter ?? REPORT_RATE.window) / 60)} minutes.`);
  }
  const aboutPlate = await client.limiter.consume(`plate-report-plate:${plate.id}`, PLATE_REPORT_RATE);
  if (!aboutPlate.allowed) {
    throw new AppError("rate_limited", `This plate has had many reports in the last hour and curators are looking at them; try again in ${Math.ceil((aboutPlate.retryAfter ?? PLATE_REPORT_RATE.window) / 60)} minutes.`);
  }
  // One window, one mail: the first report in it claims the mail.
  const mailCurators = (await client.limiter.consume(`plate-report-mail:${plate.id}`, { window: REPORT_MAIL_WINDOW_S, max: 1 })).allowed;
  const society = (await findSocietySettings(db)).name;
  const curators = await db
    .select({ name: users.name, email: users.email })
    .from(users)
    .innerJoin(userRoles, eq(userRoles.userId, users.id))
    .where(and(eq(userRoles.role, "curator"), eq(users.emailVerified, true)));
  const url = appLink(`/review/plates/${plate.id}`);
  const { id, mailIds } = await db.transaction(async (tx) => {
    const [row] = await tx
      .insert(plateReports)
      .values({ plateId: plate.id, kind: values.kind, message: values.message, reporterEmail: values.email })
      .returning({ id: plateReports.id });
    const ids: string[] = [];
    for (const c of mailCurators ? curators : []) {
      ids.push(await stageMail(tx, plateReportedMail(society, c.email, c.name, { plateTitle: plate.title, kind: values.kind, message: values.message, url, quietMinutes: REPORT_MAIL_WINDOW_S / 60 })));
    }
    // The reporter's address stays out of the audit log; the report row keeps it.
    await recordAudit(tx, { actorId: null, action: "plate.reported", subjectType: "plate", subjectId: plate.id, detail: { reportId: row.id, kind: values.kind } });
    return { id: row.id, mailIds: ids };
  });
  await sendStagedMail(db, mailIds);
  return { id };
}

/** A plate's reports, open first, newest first within each state. */
export async function listPlateReports(db: Db, actor: Actor | null, plateId: string): Promise<PlateReportDto[]> {
  requireCurator(actor, "reading reports on plates");
  const rows = await db
    .select({
      id: plateReports.id,
      kind: plateReports.kind,
      message: plateReports.message,
      reporterEmail: plateReports.reporterEmail,
      state: plateReports.state,
      answer: plateReports.answer,
      answeredAt: plateReports.answeredAt,
      answeredByName: users.name,
      createdAt: plateReports.createdAt,
    })
    .from(plateReports)
    .leftJoin(users, eq(users.id, plateReports.answeredBy))
    .where(eq(plateReports.plateId, plateId))
    .orderBy(asc(plateReports.state), desc(plateReports.createdAt));
  return rows.map((r) => ({ ...r, answeredAt: r.answeredAt?.toISOString() ?? null, createdAt: r.createdAt.toISOString() }));
}

/** Open reports across all plates, for the desk's list. */
export async function countOpenReports(db: Db, actor: Actor | null): Promise<Map<string, number>> {
  requireCurator(actor, "reading reports on plates");
  const rows = await db.select({ plateId: plateReports.plateId }).from(plateReports).where(eq(plateReports.state, "open"));
  const out = new Map<string, number>();
  for (const r of rows) out.set(r.plateId, (out.get(r.plateId) ?? 0) + 1);
  return out;
}

/** The curator answers the reporter by e-mail; the answer is kept with the report. */
export async function answerPlateReport(db: Db, actor: Actor | null, plateId: string, reportId: string, input: unknown): Promise<void> {
  const curator = requireCurator(actor, "answering reports on plates");
  const { answer, close } = parseInput(reportAnswerSchema, input);
  if (!/^[0-9a-f-]{36}$/i.test(reportId) || !/^[0-9a-f-]{36}$/i.test(plateId)) throw notFound("That report");
  const [row] = await db
    .select({ state: plateReports.state, reporterEmail: plateReports.reporterEmail, plateTitle: plates.title, slug: plates.slug })
    .from(plateReports)
    .innerJoin(plates, eq(plates.id, plateReports.plateId))
    .where(and(eq(plateReports.id, reportId), eq(plateReports.plateId, plateId)))
    .limit(1);
  if (!row) throw notFound("That report");
  if (row.state === "closed") throw new AppError("conflict", "That report is closed; it takes no further answers.");
  const society = (await findSocietySettings(db)).name;
  const mailId = await db.transaction(async (tx) => {
    await tx
      .update(plateReports)
      .set({ state: close ? "closed" : "answered", answer, answeredBy: curator.userId, answeredAt: new Date() })
      .where(eq(plateReports.id, reportId));
    const id = await stageMail(tx, plateReportAnswerMail(society, row.reporterEmail, { plateTitle: row.plateTitle, answer, url: appLink(`/plates/${row.slug}`) }));
    await recordAudit(tx, { actorId: curator.userId, action: "plate.report-answered", subjectType: "plate", subjectId: plateId, detail: { reportId, closed: close } });
    return id;
  });
  await sendStagedMail(db, [mailId]);
}

// The review desk's queue: every bracket set that has left the photographer's
// hands (anything but gathering), filtered, sorted and paged in the database.
// Curators only; the filters are parsed from the page's search parameters.
import { and, asc, count, desc, eq, inArray, ne, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { bracketSets, frames, reductions, reviewAssignments, reviewDecisions, sites, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { AppError } from "@/lib/errors";
import { REVIEW_STATES, STATE_LABELS, type ReviewState } from "./state-machine";
import { strictNumber } from "@/lib/strict-number";

/** The states the desk shows: a set still gathering frames is the photographer's alone. */
export const QUEUE_STATES = REVIEW_STATES.filter((s) => s !== "gathering") as Exclude<ReviewState, "gathering">[];
export const QUEUE_SORTS = ["submitted", "name", "photographer", "eclipse", "state", "frames"] as const;
export type QueueSort = (typeof QUEUE_SORTS)[number];
export const QUEUE_PAGE_SIZE = 25;

const blankToUndefined = (v: unknown) => (v === "" || v === null ? undefined : v);

export const queueQuerySchema = z.object({
  state: z.preprocess(blankToUndefined, z.enum([...QUEUE_STATES, "all"] as const, { error: `must be all or one of ${QUEUE_STATES.map((st) => STATE_LABELS[st]).join(", ")}` }).default("awaiting-review")),
  eclipse: z.preprocess(blankToUndefined, z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { error: "expected an eclipse date such as 2027-08-02" }).optional()),
  photographer: z.preprocess(blankToUndefined, z.string().min(1).max(64).optional()),
  mine: z.preprocess(blankToUndefined, z.enum(["1"], { error: "must be on or off" }).optional()),
  sort: z.preprocess(blankToUndefined, z.enum(QUEUE_SORTS, { error: "is not a column the queue sorts by" }).default("submitted")),
  dir: z.preprocess(blankToUndefined, z.enum(["asc", "desc"], { error: "must be ascending or descending" }).default("asc")),
  page: strictNumber(z.number({ error: "expected a page number" }).int().min(1).max(10_000).default(1)),
});
export type QueueQuery = z.infer<typeof queueQuerySchema>;

export interface QueueRowDto {
  id: string;
  name: string;
  state: ReviewState;
  eclipseId: string;
  siteName: string;
  photographerId: string;
  photographerName: string;
  frameCount: number;
  finishedReductions: number;
  submittedAt: string;
  assignedToName: string | null;
  isAssignedToMe: boolean;
  isOwn: boolean;
}

export interface QueuePageDto {
  rows: QueueRowDto[];
  total: number;
  page: number;
  pageCount: number;
  pageSize: number;
  /** Sets per state over the other filters, so the state tabs say how many each holds. */
  counts: Record<(typeof QUEUE_STATES)[number], number>;
  eclipses: string[];
  photographers: { id: string; name: string }[];
}

const assignee = alias(users, "assignee");
// The last time the photographer sent the set; sets sent before the history existed fall back to their last change.
const submittedAt = sql<Date>`coalesce((select max(${reviewDecisions.createdAt}) from ${reviewDecisions} where ${reviewDecisions.bracketSetId} = ${bracketSets.id} and ${reviewDecisions.action} = 'submit'), ${bracketSets.updatedAt})`;
const frameCount = sql<number>`(select count(*)::int from ${frames} where ${frames.bracketSetId} = ${bracketSets.id} and ${frames.kind} = 'light' and ${frames.included} = true)`;
const finishedReductions = sql<number>`(select count(*)::int from ${reductions} where ${reductions.bracketSetId} = ${bracketSets.id} and ${reductions.state} = 'done')`;

export async function listReviewQueue(db: DbOrTx, actor: Actor | null, query: QueueQuery): Promise<QueuePageDto> {
  const curator = requirePermission(actor, "review:use", "the review desk");
  const base: SQL[] = [ne(bracketSets.state, "gathering")];
  if (query.eclipse) base.push(eq(bracketSets.eclipseId, query.eclipse));
  if (query.photographer) base.push(eq(bracketSets.ownerId, query.photographer));
  if (query.mine) base.push(eq(reviewAssignments.curatorId, curator.userId));
  const where = and(...base, ...(query.state === "all" ? [] : [eq(bracketSets.state, query.state)]));

  const countRows = await db
    .select({ state: bracketSets.state, n: count() })
    .from(bracketSets)
    .leftJoin(reviewAssignments, eq(reviewAssignments.bracketSetId, bracketSets.id))
    .where(and(...base))
    .groupBy(bracketSets.state);
  const counts = Object.fromEntries(QUEUE_STATES.map((s) => [s, countRows.find((r) => r.state === s)?.n ?? 0])) as QueuePageDto["counts"];
  const total = query.state === "all" ? Object.values(counts).reduce((a, b) => a + b, 0) : counts[query.state];
  const pageCount = Math.max(1, Math.ceil(total / QUEUE_PAGE_SIZE));
  const page = Math.min(query.page, pageCount);

  const column = {
    submitted: submittedAt,
    name: sql`lower(${bracketSets.name})`,
    photographer: sql`lower(${users.name})`,
    eclipse: bracketSets.eclipseId,
    state: bracketSets.state,
    frames: frameCount,
  }[query.sort];
  const order = query.dir === "asc" ? asc : desc;
  const rows = await db
    .select({
      id: bracketSets.id,
      name: bracketSets.name,
      state: bracketSets.state,
      eclipseId: bracketSets.eclipseId,
      siteName: sites.name,
      photographerId: bracketSets.ownerId,
      photographerName: users.name,
      frameCount,
      finishedReductions,
      submittedAt,
      assignedToId: reviewAssignments.curatorId,
      assignedToName: assignee.name,
    })
    .from(bracketSets)
    .innerJoin(users, eq(users.id, bracketSets.ownerId))
    .innerJoin(sites, eq(sites.id, bracketSets.siteId))
    .leftJoin(reviewAssignments, eq(reviewAssignments.bracketSetId, bracketSets.id))
    .leftJoin(assignee, eq(assignee.id, reviewAssignments.curatorId))
    .where(where)
    .orderBy(order(column), asc(bracketSets.id))
    .limit(QUEUE_PAGE_SIZE)
    .offset((page - 1) * QUEUE_PAGE_SIZE);

  const [eclipseRows, photographerRows] = await Promise.all([
    db.selectDistinct({ id: bracketSets.eclipseId }).from(bracketSets).where(ne(bracketSets.state, "gathering")).orderBy(desc(bracketSets.eclipseId)),
    db
      .selectDistinct({ id: users.id, name: users.name })
      .from(bracketSets)
      .innerJoin(users, eq(users.id, bracketSets.ownerId))
      .where(ne(bracketSets.state, "gathering"))
      .orderBy(asc(users.name)),
  ]);

  return {
    rows: rows.map(({ assignedToId, submittedAt: at, ...r }) => ({
      ...r,
      frameCount: Number(r.frameCount),
      finishedReductions: Number(r.finishedReductions),
      submittedAt: new Date(at).toISOString(),
      isAssignedToMe: assignedToId === curator.userId,
      isOwn: r.photographerId === curator.userId,
    })),
    total,
    page,
    pageCount,
    pageSize: QUEUE_PAGE_SIZE,
    counts,
    eclipses: eclipseRows.map((e) => e.id),
    photographers: photographerRows,
  };
}

export const assignSchema = z.object({
  setIds: z.array(z.uuid({ error: "expected bracket set ids" }), { error: "expected a list of bracket set ids" }).min(1, { error: "choose at least one bracket set" }).max(100, { error: "at most 100 sets at once" }),
  assign: z.boolean({ error: "expected true (take) or false (hand back)" }).default(true),
});

/**
 * Takes sets in hand (or hands them back). Safe in bulk: it changes no state
 * and sends nothing, it only tells other curators who is looking. Never one's
 * own set, and only sets on the desk.
 */
export async function assignToMe(db: DbOrTx, actor: Actor | null, input: z.infer<typeof assignSchema>): Promise<{ changed: number }> {
  const curator = requirePermission(actor, "review:use", "taking bracket sets in hand");
  const ids = [...new Set(input.setIds)];
  const found = await db
    .select({ id: bracketSets.id, name: bracketSets.name, ownerId: bracketSets.ownerId, state: bracketSets.state })
    .from(bracketSets)
    .where(inArray(bracketSets.id, ids));
  const missing = ids.filter((id) => !found.some((f) => f.id === id && f.state !== "gathering"));
  if (missing.length) throw new AppError("not_found", `${missing.length} of the chosen bracket sets are not on the review desk.`);
  const own = found.filter((f) => f.ownerId === curator.userId);
  if (input.assign && own.length) throw new AppError("forbidden", `"${own[0].name}" is your own bracket set: another curator has to review it.`);
  if (input.assign) {
    const rows = await db
      .insert(reviewAssignments)
      .values(ids.map((bracketSetId) => ({ bracketSetId, curatorId: curator.userId })))
      .onConflictDoUpdate({ target: reviewAssignments.bracketSetId, set: { curatorId: curator.userId, assignedAt: sql`now()` } })
      .returning({ id: reviewAssignments.bracketSetId });
    for (const id of ids) await recordAudit(db, { actorId: curator.userId, action: "review.assign", subjectType: "bracket-set", subjectId: id });
    return { changed: rows.length };
  }
  const rows = await db
    .delete(reviewAssignments)
    .where(and(inArray(reviewAssignments.bracketSetId, ids), eq(reviewAssignments.curatorId, curator.userId)))
    .returning({ id: reviewAssignments.bracketSetId });
  for (const r of rows) await recordAudit(db, { actorId: curator.userId, action: "review.unassign", subjectType: "bracket-set", subjectId: r.id });
  return { changed: rows.length };
}

const CSV_HEADER = ["id", "name", "state", "eclipse", "site", "photographer", "included_light_frames", "finished_reductions", "submitted_at", "in_hand_of"];

/** One CSV cell: quoted when needed, and a leading = + - @ neutralised so spreadsheets do not run it as a formula. */
export function csvCell(v: string | number | null): string {
  let s = v === null ? "" : String(v);
  if (/^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** The whole filtered queue (every page) as CSV, for planning a review session offline. */
export async function exportReviewQueueCsv(db: DbOrTx, actor: Actor | null, query: QueueQuery): Promise<string> {
  const lines = [CSV_HEADER.join(",")];
  let page = 1;
  for (;;) {
    const p = await listReviewQueue(db, actor, { ...query, page });
    for (const r of p.rows) {
      lines.push([r.id, r.name, r.state, r.eclipseId, r.siteName, r.photographerName, r.frameCount, r.finishedReductions, r.submittedAt, r.assignedToName].map(csvCell).join(","));
    }
    if (page >= p.pageCount) break;
    page++;
  }
  return lines.join("\r\n") + "\r\n";
}

// The photographer gives capture times and exposures for many frames at once:
// from a CSV matched by file name, or from a first time and an interval in shot
// order. All or nothing: a bad row changes no frame. Times are stored as the
// camera's clock showed them, beside the file's own (which stays as read).
import { and, eq, sql } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { frames, type Frame } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { AppError } from "@/lib/errors";
import { findOwnOpenSet } from "./access";
import type { FrameTimesResultDto } from "./dto";
import { assignIntervalTimes, describeCsvProblems, MAX_INTERVAL_S, MIN_INTERVAL_S, parseCameraTime, parseTimesCsv } from "./frame-times";

/** A CSV of a few thousand frames is well under this; the limit keeps a wrong file (a raw image) out. */
export const MAX_TIMES_CSV_CHARS = 512 * 1024;

export const frameTimesSchema = z.discriminatedUnion(
  "method",
  [
    z.object({
      method: z.literal("csv"),
      fileName: z.string().trim().min(1, { error: "needs the CSV's name" }).max(255),
      text: z.string().max(MAX_TIMES_CSV_CHARS, { error: `the CSV is larger than ${MAX_TIMES_CSV_CHARS / 1024} KiB; is it the right file?` }),
    }),
    z.object({
      method: z.literal("interval"),
      firstAt: z.string().trim().min(1, { error: "needs the first frame's time" }).max(64),
      intervalS: z.coerce
        .number({ error: "expected seconds" })
        .refine(Number.isFinite, { error: "expected a number of seconds" })
        .min(MIN_INTERVAL_S, { error: `must be at least ${MIN_INTERVAL_S} s` })
        .max(MAX_INTERVAL_S, { error: `must be at most ${MAX_INTERVAL_S} s` }),
      /** "missing": only light frames without any time; "all": every light frame. */
      scope: z.enum(["missing", "all"], { error: "expected missing or all" }).default("missing"),
    }),
  ],
  { error: "expected method csv or interval" },
);
export type FrameTimesInput = z.infer<typeof frameTimesSchema>;

type FrameRow = Pick<Frame, "id" | "originalFileName" | "kind" | "ingestState" | "captureAt" | "givenCaptureAt">;

function indexByName(rows: FrameRow[]): { exact: Map<string, FrameRow>; folded: Map<string, FrameRow[]> } {
  const exact = new Map(rows.map((r) => [r.originalFileName, r]));
  const folded = new Map<string, FrameRow[]>();
  for (const r of rows) folded.set(r.originalFileName.toLowerCase(), [...(folded.get(r.originalFileName.toLowerCase()) ?? []), r]);
  return { exact, folded };
}

async function setFrames(db: DbOrTx, setId: string, updates: { id: string; captureMs?: number; exposureS?: number; source: "csv" | "interval" }[]): Promise<void> {
  await db.transaction(async (tx) => {
    for (const u of updates) {
      await tx
        .update(frames)
        .set({
          ...(u.captureMs !== undefined ? { givenCaptureAt: new Date(u.captureMs), givenCaptureSource: u.source } : {}),
          ...(u.exposureS !== undefined ? { exposureS: u.exposureS, exposureSource: "photographer" as const } : {}),
          updatedAt: sql`now()`,
        })
        .where(and(eq(frames.id, u.id), eq(frames.bracketSetId, setId)));
    }
  });
}

export async function giveFrameTimes(db: DbOrTx, actor: Actor | null, setId: string, input: FrameTimesInput): Promise<FrameTimesResultDto> {
  const { set } = await findOwnOpenSet(db, actor, setId);
  const rows: FrameRow[] = await db
    .select({ id: frames.id, originalFileName: frames.originalFileName, kind: frames.kind, ingestState: frames.ingestState, captureAt: frames.captureAt, givenCaptureAt: frames.givenCaptureAt })
    .from(frames)
    .where(eq(frames.bracketSetId, set.id));
  // The eclipse's date: a bare time of day is UTC on that day.
  const day = set.eclipseId;

  if (input.method === "csv") {
    const parsed = parseTimesCsv(input.text, day);
    const problems = [...parsed.problems];
    const { exact, folded } = indexByName(rows.filter((r) => r.ingestState !== "refused"));
    const updates: { id: string; captureMs?: number; exposureS?: number; source: "csv" }[] = [];
    for (const row of parsed.rows) {
      const candidates = exact.has(row.fileName) ? [exact.get(row.fileName)!] : (folded.get(row.fileName.toLowerCase()) ?? []);
      if (candidates.length !== 1) {
        problems.push({
          line: row.line,
          column: "file",
          message: candidates.length ? `${row.fileName} matches ${candidates.length} frames that differ only in capital letters` : `no frame of this set is named ${row.fileName}`,
        });
        continue;
      }
      updates.push({ id: candidates[0].id, captureMs: row.captureMs, exposureS: row.exposureS, source: "csv" });
    }
    if (problems.length) {
      problems.sort((a, b) => a.line - b.line);
      throw new AppError("invalid_input", describeCsvProblems(input.fileName, problems), problems.slice(0, 12).map((p) => ({ field: p.column ?? "csv", message: `line ${p.line}: ${p.message}` })));
    }
    await setFrames(db, set.id, updates);
    const byId = new Map(rows.map((r) => [r.id, r.originalFileName]));
    return {
      timesSet: updates.filter((u) => u.captureMs !== undefined).length,
      exposuresSet: updates.filter((u) => u.exposureS !== undefined).length,
      fileNames: updates.map((u) => byId.get(u.id) ?? ""),
    };
  }

  const first = parseCameraTime(input.firstAt, day);
  if ("problem" in first) throw new AppError("invalid_input", `The first frame's time ${first.problem}.`, [{ field: "firstAt", message: first.problem }]);
  const lights = rows.filter((r) => r.kind === "light" && r.ingestState !== "refused");
  const chosen = input.scope === "all" ? lights : lights.filter((r) => r.captureAt === null && r.givenCaptureAt === null);
  if (chosen.length === 0) {
    throw new AppError(
      "invalid_input",
      input.scope === "all" ? `The bracket set "${set.name}" has no light frames to give times to.` : `Every light frame of "${set.name}" already has a capture time; choose "every light frame" to replace them.`,
      [{ field: "scope", message: "no frames to give times to" }],
    );
  }
  const timed = assignIntervalTimes(
    chosen.map((r) => ({ id: r.id, fileName: r.originalFileName })),
    first.ms,
    input.intervalS,
  );
  await setFrames(db, set.id, timed.map((t) => ({ id: t.item.id, captureMs: t.captureMs, source: "interval" as const })));
  return { timesSet: timed.length, exposuresSet: 0, fileNames: timed.map((t) => t.item.fileName) };
}

// What the reduction page reads of a reduction's outputs beyond its row: the
// parsed report and the frames it names. Visible exactly when the reduction is
// (its bracket set's owner and curators; lib/reductions/files/serve.ts decides);
// the files themselves are served by lib/reductions/files.
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { bracketSets, frames } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { bucketName, isMissingObject, readSmallObject, toSafeFileName } from "@/lib/storage";
import { findVisibleOutputs } from "./files/serve";
import { parseReport, type ParsedReport } from "./report-schema";

export interface FrameRef {
  id: string;
  originalFileName: string;
}

export interface ReductionOutputsView {
  setId: string;
  setName: string;
  /** Parsed report.json; null while the reduction is not done or when the report cannot be read. */
  report: ParsedReport | null;
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
  const found = await findVisibleOutputs(db, actor, { kind: "reduction", id: reductionId });
  const setId = found.setId!;
  const [set] = await db.select({ name: bracketSets.name }).from(bracketSets).where(eq(bracketSets.id, setId)).limit(1);
  const view: ReductionOutputsView = { setId, setName: set?.name ?? found.setName ?? "", report: null, reportProblem: null, frameIdsByName: {} };
  if (!found.prefix) return view;
  try {
    const bytes = await readSmallObject({ bucket: bucketName("derived"), key: `${found.prefix}report.json` }, 64 * 1024 ** 2);
    view.report = parseReport(JSON.parse(bytes.toString("utf8")));
  } catch (err) {
    if (!isMissingObject(err) && !(err instanceof SyntaxError)) throw err;
    view.reportProblem = isMissingObject(err) ? "report.json is missing from the reduction's files." : "report.json could not be read as JSON.";
    return view;
  }
  const rows: FrameRef[] = await db.select({ id: frames.id, originalFileName: frames.originalFileName }).from(frames).where(eq(frames.bracketSetId, setId));
  const byId = new Map(rows.map((r) => [r.id, r]));
  for (const f of view.report.frames) {
    const direct = f.frameId && byId.has(f.frameId) ? f.frameId : null;
    const match = direct ?? rows.find((r) => toSafeFileName(r.originalFileName) === f.name || `${r.id.slice(0, 8)}-${toSafeFileName(r.originalFileName)}` === f.name)?.id;
    if (match) view.frameIdsByName[f.name] = match;
  }
  return view;
}

// One output of a finished composite, streamed from S3, for whoever may see the
// composite (findComposite's rule); to anyone else it answers "not found".
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { composites } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { AppError, notFound } from "@/lib/errors";
import { findOutputContentType } from "@/lib/reductions/output-paths";
import { bucketName, openObjectStream } from "@/lib/storage";
import { findComposite } from "./composites";
import { isCompositeOutputPath } from "./output-paths";

export interface CompositeOutputFile {
  body: ReadableStream<Uint8Array>;
  contentType: string;
  contentLength?: number;
  etag?: string;
  downloadName: string;
}

/** "composite-1a2b3c4d-natural.png": what the file is, with no characters that need quoting in a header. */
function buildDownloadName(compositeId: string, path: string): string {
  return `composite-${compositeId.slice(0, 8)}-${path.replace(/\//g, "-").replace(/[^A-Za-z0-9._-]/g, "-")}`;
}

export async function openCompositeOutput(db: DbOrTx, actor: Actor | null, compositeId: string, path: string): Promise<CompositeOutputFile> {
  if (!isCompositeOutputPath(path)) {
    throw new AppError("invalid_input", `"${path.slice(0, 80)}" is not one of a composite's files: expected master.fits, natural.png, structure.png, preview.jpg, preview-structure.jpg, contribution.jpg, report.json or a tile under tiles/.`);
  }
  const composite = await findComposite(db, actor, compositeId);
  const [row] = await db.select({ outputs: composites.outputs }).from(composites).where(eq(composites.id, composite.id)).limit(1);
  const prefix = composite.state === "done" && typeof row?.outputs?.prefix === "string" ? row.outputs.prefix : null;
  if (!prefix) throw notFound(`The files of this composite (it is ${composite.state})`);
  const file = await openObjectStream({ bucket: bucketName("derived"), key: prefix + path });
  if (!file) throw notFound(`The file ${path} of this composite`);
  return { ...file, contentType: findOutputContentType(path), downloadName: buildDownloadName(composite.id, path) };
}

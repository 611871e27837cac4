// Removing a frame from a set before it is submitted: any frame, refused ones
// included, by the set's owner. The frame row goes (and with it the frame's
// upload record); its original and thumbnail are deleted from storage only when
// no reduction of the set may have read them. A set with a finished reduction
// keeps the originals that reduction was made from: originals are never changed,
// and a reduction's record stays reproducible. A reduction still running refuses
// the removal until it ends, since the worker may be reading the file.
import { and, eq, inArray } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { frames, reductions, uploads } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { AppError } from "@/lib/errors";
import { bucketName, buildThumbnailKey } from "@/lib/storage";
import { deleteObject } from "@/lib/storage";
import { findFrameOfOwnOpenSet } from "./access";
import type { RemovedFrameDto } from "./dto";

async function deleteStored(bucket: string, key: string): Promise<void> {
  // S3 answers a delete of a missing key with success, so a repeated removal is harmless.
  await deleteObject({ bucket, key });
}

export async function removeFrame(db: DbOrTx, actor: Actor | null, setId: string, frameId: string): Promise<RemovedFrameDto> {
  const { set, frame } = await findFrameOfOwnOpenSet(db, actor, setId, frameId);
  const runs = await db
    .select({ state: reductions.state })
    .from(reductions)
    .where(and(eq(reductions.bracketSetId, set.id), inArray(reductions.state, ["queued", "running", "done"])));
  if (runs.some((r) => r.state === "queued" || r.state === "running")) {
    throw new AppError("conflict", `${frame.originalFileName} cannot be removed while a reduction of "${set.name}" is waiting or running; remove it when the reduction has ended.`);
  }
  const isOriginalDeleted = runs.length === 0;
  await db.transaction(async (tx) => {
    await tx.delete(uploads).where(and(eq(uploads.bracketSetId, set.id), eq(uploads.frameId, frame.id)));
    await tx.delete(frames).where(and(eq(frames.id, frame.id), eq(frames.bracketSetId, set.id)));
  });
  // After the commit: a storage fault leaves an unreferenced object, never a row without its file.
  const thumbnailKey = frame.thumbnailKey ?? buildThumbnailKey(set.id, frame.id);
  await deleteStored(bucketName("derived"), thumbnailKey).catch((err) => console.error(`[frames] thumbnail of ${frame.originalFileName} not deleted:`, err));
  if (isOriginalDeleted) {
    await deleteStored(bucketName("originals"), frame.originalKey).catch((err) => console.error(`[frames] original of ${frame.originalFileName} not deleted:`, err));
  }
  return { id: frame.id, fileName: frame.originalFileName, isOriginalDeleted };
}

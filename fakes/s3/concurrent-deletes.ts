// s3rver's file store removes the folders a delete leaves empty, and two deletes
// in one folder at once race there: both see it empty, one removes it, and the
// other fails on the folder gone (ENOENT, or ENOTEMPTY when a put refills it),
// though its own object is gone. s3rver answers that InternalError, every retry
// fails the same way, and a prefix's delete (a reduction's tiles, its work
// pieces) stopped half done. S3 has no folders: a delete of a key succeeds
// whatever its neighbours do. The fake's deletes do the same.

interface DeletingStore {
  deleteObject(bucket: string, key: string): Promise<void>;
}

/** Codes of the folder clean-up's races; the object's own files are unlinked before it, missing ones ignored. */
const FOLDER_RACES = new Set(["ENOENT", "ENOTEMPTY"]);

/** Makes `store.deleteObject` succeed when only the clean-up of empty folders met another request's. */
export function tolerateFolderRaces(store: DeletingStore): void {
  const deleteObject = store.deleteObject.bind(store);
  store.deleteObject = async (bucket, key) => {
    try {
      await deleteObject(bucket, key);
    } catch (err) {
      if (!FOLDER_RACES.has((err as NodeJS.ErrnoException).code ?? "")) throw err;
    }
  };
}

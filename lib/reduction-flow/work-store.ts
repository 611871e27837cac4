// Where a reduction run as a flow keeps what its parts hand each other: one S3
// prefix per run (the reduction and its parent job's creation time, so that a
// reduction queued anew never reads an older run's pieces), deleted when the run
// has stored its outputs. Keys are fixed by name, so a part that runs again
// overwrites its own piece and nothing is counted twice.
import { mkdir } from "node:fs/promises";
import path from "node:path";
import { readFile } from "node:fs/promises";
import { bucketName, deleteObjectsUnder, downloadObjectToFile, putObjectBytes } from "@/lib/storage";
import { buildReductionWorkPrefix } from "@/lib/storage/keys";
import { decodeWork, encodeWork, readWorkFile, type ArrayReader } from "./work-blob";

export interface WorkPlace {
  reductionId: string;
  /** The parent job's creation time in ms (part job ids carry it). */
  runKey: string;
}

function keyOf(place: WorkPlace, name: string): string {
  return `${buildReductionWorkPrefix(place.reductionId)}${place.runKey}/${name}.bin`;
}

/** Stores a piece under its name (overwriting a piece of that name). */
export async function putWork(place: WorkPlace, name: string, value: unknown): Promise<void> {
  await putObjectBytes({ bucket: bucketName("derived"), key: keyOf(place, name) }, encodeWork(value), "application/octet-stream");
}

/** Downloads a piece into `dir` and returns the file's path. */
export async function fetchWorkFile(place: WorkPlace, name: string, dir: string): Promise<string> {
  await mkdir(dir, { recursive: true });
  const file = path.join(dir, `${name}.bin`);
  await downloadObjectToFile({ bucket: bucketName("derived"), key: keyOf(place, name) }, file);
  return file;
}

/** A piece read whole into memory. */
export async function getWork<T>(place: WorkPlace, name: string, dir: string): Promise<T> {
  const file = await fetchWorkFile(place, name, dir);
  return decodeWork<T>(await readFile(file), name);
}

/** A piece downloaded to `dir` whose arrays are read from disk only when touched (through `cache`). */
export async function openWork<T>(place: WorkPlace, name: string, dir: string, cache?: ArrayReader): Promise<T> {
  return readWorkFile<T>(await fetchWorkFile(place, name, dir), cache);
}

/** Deletes every piece of every run of a reduction. */
export async function deleteReductionWork(reductionId: string): Promise<number> {
  return deleteObjectsUnder({ bucket: bucketName("derived"), prefix: buildReductionWorkPrefix(reductionId) });
}

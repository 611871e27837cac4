// Where a reduction run as a flow keeps what its parts hand each other: one S3
// prefix per run (the reduction and its parent job's creation time, so that a
// reduction queued anew never reads an older run's pieces), deleted when the run
// has stored its outputs. Keys are fixed by name, so a part that runs again
// overwrites its own piece and nothing is counted twice.
import { mkdir, mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { bucketName, deleteObjectsUnder, downloadObjectToFile, MAX_SINGLE_PUT_BYTES, putObjectChunks, putObjectFileWhole, readObjectChunks } from "@/lib/storage";
import { buildReductionWorkPrefix } from "@/lib/storage/keys";
import { encodeWorkChunks, readWorkFile, readWorkStream, writeWorkFile, type ArrayReader } from "./work-blob";
import type { ArrayMemory } from "@/lib/imaging/plane-runner";

export interface WorkPlace {
  reductionId: string;
  /** The parent job's creation time in ms (part job ids carry it). */
  runKey: string;
}

function keyOf(place: WorkPlace, name: string): string {
  return `${buildReductionWorkPrefix(place.reductionId)}${place.runKey}/${name}.bin`;
}

/**
 * Stores a piece under its name (overwriting a piece of that name), streamed up
 * array by array as it is encoded, so that storing a value never holds a second
 * copy of it in memory nor writes it to local disk. A piece too large for one PUT
 * (5 GB) goes through a file of its own and is sent in parts.
 */
export async function putWork(place: WorkPlace, name: string, value: unknown): Promise<void> {
  const ref = { bucket: bucketName("derived"), key: keyOf(place, name) };
  const encoded = encodeWorkChunks(value);
  if (encoded.length <= MAX_SINGLE_PUT_BYTES) return putObjectChunks(ref, encoded.chunks(), encoded.length, "application/octet-stream");
  const dir = await mkdtemp(path.join(tmpdir(), "crownlight-put-"));
  try {
    const file = path.join(dir, `${name}.bin`);
    writeWorkFile(file, value);
    await putObjectFileWhole(ref, file, "application/octet-stream");
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

/** Downloads a piece into `dir` and returns the file's path. */
export async function fetchWorkFile(place: WorkPlace, name: string, dir: string): Promise<string> {
  await mkdir(dir, { recursive: true });
  const file = path.join(dir, `${name}.bin`);
  await downloadObjectToFile({ bucket: bucketName("derived"), key: keyOf(place, name) }, file);
  return file;
}

/**
 * A piece read whole into memory as it downloads, each array straight from the
 * stream (nothing goes to local disk); float32 and uint8 arrays into `memory`
 * when given (a plane runner's: the caller then gives them back to it).
 */
export async function getWork<T>(place: WorkPlace, name: string, memory?: ArrayMemory): Promise<T> {
  const ref = { bucket: bucketName("derived"), key: keyOf(place, name) };
  const body = await readObjectChunks(ref);
  if (!body) throw new Error(`the reduction's piece "${name}" is missing from storage (${ref.key})`);
  return readWorkStream<T>(body.chunks, `the piece "${name}"`, memory, body.length);
}

/** A piece downloaded to `dir` whose arrays are read from disk only when touched (through `cache`). */
export async function openWork<T>(place: WorkPlace, name: string, dir: string, cache?: ArrayReader): Promise<T> {
  return readWorkFile<T>(await fetchWorkFile(place, name, dir), cache);
}

/** Deletes every piece of every run of a reduction. */
export async function deleteReductionWork(reductionId: string): Promise<number> {
  return deleteObjectsUnder({ bucket: bucketName("derived"), prefix: buildReductionWorkPrefix(reductionId) });
}

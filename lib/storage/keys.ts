// Object keys. Originals live at originals/{setId}/{frameId}/{safe file name}:
// the frame id makes every key unique, so an original is never overwritten, and
// the readable name helps whoever browses the bucket. Derived files sit under
// derived/ with the same ids, so they can be rebuilt without touching originals.

const MAX_NAME_CHARS = 120;
// Only these characters reach a key: S3 accepts more, but these need no
// escaping in URLs, shells or the fake's file system.
const UNSAFE = /[^A-Za-z0-9._-]+/g;
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * A file name safe inside a key: the last path segment only, accents folded,
 * anything else replaced by "-", no leading dots, at most 120 characters with the
 * extension kept. "file" when nothing is left.
 */
export function toSafeFileName(name: string): string {
  const last = name.split(/[\\/]/).pop() ?? "";
  const folded = last.normalize("NFKD").replace(/[\u0300-\u036f]/g, "");
  let safe = folded.replace(UNSAFE, "-").replace(/-{2,}/g, "-").replace(/^[.-]+/, "").replace(/-+(\.|$)/g, "$1");
  if (safe.length > MAX_NAME_CHARS) {
    const dot = safe.lastIndexOf(".");
    const ext = dot > 0 && safe.length - dot <= 10 ? safe.slice(dot) : "";
    safe = safe.slice(0, MAX_NAME_CHARS - ext.length) + ext;
  }
  return safe === "" || safe === "." ? "file" : safe;
}

function requireUuid(id: string, what: string): string {
  if (!UUID.test(id)) throw new RangeError(`${what} must be a UUID, not ${JSON.stringify(id)}`);
  return id.toLowerCase();
}

export function buildOriginalKey(setId: string, frameId: string, fileName: string): string {
  return `originals/${requireUuid(setId, "bracket set id")}/${requireUuid(frameId, "frame id")}/${toSafeFileName(fileName)}`;
}

export function buildThumbnailKey(setId: string, frameId: string): string {
  return `derived/${requireUuid(setId, "bracket set id")}/frames/${requireUuid(frameId, "frame id")}/thumbnail.jpg`;
}

/** Prefix of everything derived from one bracket set (thumbnails now, reductions later). */
export function buildDerivedPrefix(setId: string): string {
  return `derived/${requireUuid(setId, "bracket set id")}/`;
}

/** Prefix of a reduction's outputs, beside its set's other derived files (lib/reductions/files/manifest.ts lists them). */
export function buildReductionPrefix(setId: string, reductionId: string): string {
  return `${buildDerivedPrefix(setId)}reductions/${requireUuid(reductionId, "reduction id")}/`;
}

/** Prefix of the pieces a reduction's parts hand each other while it runs (deleted when it ends). */
export function buildReductionWorkPrefix(reductionId: string): string {
  return `work/reductions/${requireUuid(reductionId, "reduction id")}/`;
}

/** Prefix of a composite's outputs (its inputs are other reductions' masters, read where they are). */
export function buildCompositePrefix(compositeId: string): string {
  return `derived/composites/${requireUuid(compositeId, "composite id")}/`;
}

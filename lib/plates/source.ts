// What a plate version shows: one reduction of a bracket set, or one composite
// of several reductions. Both keep their files under a prefix with one layout
// (master.fits, the renditions, preview.jpg, tiles/), so the public pages, the
// tile route, the downloads and the print bundle only need to know which one
// and where its public files are served. Client-safe: no Node or database imports.

export type PlateSource = { kind: "reduction"; id: string } | { kind: "composite"; id: string };

/** The source of a version row (the database keeps exactly one of the two ids). */
export function sourceOfVersion(v: { reductionId: string | null; compositeId: string | null }): PlateSource {
  if (v.compositeId) return { kind: "composite", id: v.compositeId };
  if (v.reductionId) return { kind: "reduction", id: v.reductionId };
  throw new Error("a plate version without a reduction or a composite");
}

/** Where a reduction's public files are served; the tiles folder's names follow the worker's layout. */
export function reductionFilesBase(reductionId: string): string {
  return `/iiif/reductions/${reductionId}`;
}

/** Where a composite's public files are served, in the same layout as a reduction's. */
export function compositeFilesBase(compositeId: string): string {
  return `/iiif/composites/${compositeId}`;
}

export function plateFilesBase(source: PlateSource): string {
  return source.kind === "composite" ? compositeFilesBase(source.id) : reductionFilesBase(source.id);
}

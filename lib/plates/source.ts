// What a plate version shows: one reduction of a bracket set, or one composite
// of several reductions. Both keep their files under a prefix with one layout
// (master.fits, the renditions, preview.jpg, tiles/), so the public pages, the
// tile route, the downloads and the print bundle only need to know which one
// and where its public files are served. Client-safe: no Node or database imports.

import { publicFilesBase, type OutputSource } from "@/lib/reductions/files/manifest";

export type PlateSource = OutputSource;

/** The source of a version row (the database keeps exactly one of the two ids). */
export function sourceOfVersion(v: { reductionId: string | null; compositeId: string | null }): PlateSource {
  if (v.compositeId) return { kind: "composite", id: v.compositeId };
  if (v.reductionId) return { kind: "reduction", id: v.reductionId };
  throw new Error("a plate version without a reduction or a composite");
}

/** Where the version's public files are served (lib/reductions/files/manifest.ts). */
export const plateFilesBase = publicFilesBase;

// A published plate's downloads follow one file-name pattern:
//   {plate slug}-v{version}-{what}.{ext}
//   corona-over-luxor-v1-web.jpg, ...-v1-natural-16bit.png, ...-v1-structure-16bit.png, ...-v1-master.fits
// Pure: the public DTOs, the file routes and the tests share it.

export type PlateDownloadKind = "web" | "natural" | "structure" | "master";

const SUFFIX: Record<PlateDownloadKind, string> = {
  web: "web.jpg",
  natural: "natural-16bit.png",
  structure: "structure-16bit.png",
  master: "master.fits",
};

/** Which stored file of the reduction each downloadable kind is (the web JPEG lives with the plate). */
export const REDUCTION_FILE_OF: Record<Exclude<PlateDownloadKind, "web">, string> = {
  natural: "natural.png",
  structure: "structure.png",
  master: "master.fits",
};

/** A plate slug is already lowercase letters, digits and hyphens; anything else is dropped all the same. */
export function plateDownloadName(slug: string, version: number, kind: PlateDownloadKind): string {
  const safe = slug.toLowerCase().replace(/[^a-z0-9-]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 100) || "plate";
  return `${safe}-v${version}-${SUFFIX[kind]}`;
}

/** A name asked for in a download address: only the pattern above passes, so a header can never be forged through it. */
export function isPlateDownloadName(name: string, storedPath: string): boolean {
  const m = /^[a-z0-9][a-z0-9-]{0,100}-v\d{1,5}-(web\.jpg|natural-16bit\.png|structure-16bit\.png|master\.fits)$/.exec(name);
  if (!m) return false;
  const kind = (Object.keys(SUFFIX) as PlateDownloadKind[]).find((k) => SUFFIX[k] === m[1])!;
  return kind !== "web" && REDUCTION_FILE_OF[kind] === storedPath;
}


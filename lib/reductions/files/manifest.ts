// What a reduction or a composite stores, file by file: the one list that the
// worker's writes (content types), the private files routes (/api/reductions/{id}/files,
// /api/composites/{id}/files) and the public tile route (/iiif/reductions/{id},
// /iiif/composites/{id}) all read. Each entry says which paths it matches, their
// content type, their kind (what the public route's licence and cache rules
// follow) and whether the public may ever have it; content types go by extension. Client-safe: pages build
// links with it (no Node or database imports).

export type OutputSourceKind = "reduction" | "composite";

/** What a stored output belongs to: a reduction or a composite, by id. */
export interface OutputSource {
  kind: OutputSourceKind;
  id: string;
}

/** tile and preview: anyone may see them once published; download: only when the licence allows. */
export type OutputKind = "tile" | "preview" | "download";

export interface OutputEntry {
  /** Matches the path under the output's prefix, e.g. "master.fits" or "tiles/natural.dzi". */
  pattern: RegExp;
  kind: OutputKind;
  /** False for what never leaves the owner's circle (report.json holds the exact site). */
  isPublic: boolean;
  /** Which kinds of output have it. */
  of: readonly OutputSourceKind[];
}

const BOTH = ["reduction", "composite"] as const;

/** The one table of content types, by extension. */
const TYPE = { fits: "application/fits", png: "image/png", jpg: "image/jpeg", json: "application/json", dzi: "application/xml" } as const;

export const OUTPUT_FILES: readonly OutputEntry[] = [
  { pattern: /^master\.fits$/, kind: "download", isPublic: true, of: BOTH },
  { pattern: /^(natural|structure)\.png$/, kind: "download", isPublic: true, of: BOTH },
  { pattern: /^preview\.jpg$/, kind: "preview", isPublic: true, of: BOTH },
  { pattern: /^preview-structure\.jpg$/, kind: "preview", isPublic: false, of: BOTH },
  // Which input gives the light where: the public viewer's map layer on a composite's plate.
  { pattern: /^contribution\.jpg$/, kind: "preview", isPublic: true, of: ["composite"] },
  { pattern: /^coverage\.png$/, kind: "preview", isPublic: false, of: ["reduction"] },
  { pattern: /^report\.json$/, kind: "download", isPublic: false, of: BOTH },
  { pattern: /^tiles\/(natural|structure)\.dzi$/, kind: "tile", isPublic: true, of: BOTH },
  { pattern: /^tiles\/(natural|structure)_files\/\d{1,2}\/\d{1,6}_\d{1,6}\.jpg$/, kind: "tile", isPublic: true, of: BOTH },
  { pattern: /^tiles\/(natural|structure)-iiif\/info\.json$/, kind: "tile", isPublic: true, of: BOTH },
  {
    pattern: /^tiles\/(natural|structure)-iiif\/(full|\d{1,6},\d{1,6},\d{1,6},\d{1,6})\/(max|\d{1,6},\d{0,6}|,\d{1,6})\/0\/default\.jpg$/,
    kind: "tile",
    isPublic: true,
    of: BOTH,
  },
];

/** The entry a stored path matches for this kind of output, or null (.., absolute paths and other names never match). */
export function findOutputEntry(path: string, of: OutputSourceKind): OutputEntry | null {
  if (path.length > 200 || path.includes("..") || path.includes("//")) return null;
  return OUTPUT_FILES.find((e) => e.of.includes(of) && e.pattern.test(path)) ?? null;
}

/** True when the path names one of a reduction's outputs. */
export function isReductionOutputPath(path: string): boolean {
  return findOutputEntry(path, "reduction") !== null;
}

/** True when the path names one of a composite's outputs. */
export function isCompositeOutputPath(path: string): boolean {
  return findOutputEntry(path, "composite") !== null;
}

/** The content type the worker stores a file under and the routes answer with, by its extension. */
export function findOutputContentType(path: string): string {
  const ext = path.slice(path.lastIndexOf(".") + 1).toLowerCase();
  return (TYPE as Record<string, string>)[ext] ?? "application/octet-stream";
}

/**
 * The stored path behind a public URL's path: the public route names tiles
 * without their folder ("natural.dzi", as IIIF and Deep Zoom viewers ask), other
 * files as they are stored. Null when the stored path is not one the public may have.
 */
export function findPublicOutput(publicPath: string, of: OutputSourceKind): { path: string; entry: OutputEntry } | null {
  const tile = findOutputEntry(`tiles/${publicPath}`, of);
  if (tile?.kind === "tile" && tile.isPublic) return { path: `tiles/${publicPath}`, entry: tile };
  const file = findOutputEntry(publicPath, of);
  return file && file.kind !== "tile" && file.isPublic ? { path: publicPath, entry: file } : null;
}

/** Where a reduction's public files are served; the tiles folder's names follow the worker's layout. */
export function reductionFilesBase(reductionId: string): string {
  return `/iiif/reductions/${reductionId}`;
}

/** Where a composite's public files are served, in the same layout as a reduction's. */
export function compositeFilesBase(compositeId: string): string {
  return `/iiif/composites/${compositeId}`;
}

export function publicFilesBase(source: OutputSource): string {
  return source.kind === "composite" ? compositeFilesBase(source.id) : reductionFilesBase(source.id);
}

const inUrl = (path: string) => path.split("/").map(encodeURIComponent).join("/");

/** URL of one output as a reduction's private files route serves it, with ?download=1 when asked. */
export function buildOutputUrl(reductionId: string, path: string, options: { download?: boolean } = {}): string {
  return `/api/reductions/${encodeURIComponent(reductionId)}/files/${inUrl(path)}${options.download ? "?download=1" : ""}`;
}

/** URL of one output as a composite's private files route serves it. */
export function buildCompositeOutputUrl(compositeId: string, path: string, options: { download?: boolean } = {}): string {
  return `/api/composites/${encodeURIComponent(compositeId)}/files/${inUrl(path)}${options.download ? "?download=1" : ""}`;
}

const headerSafe = (path: string) => path.replace(/\//g, "-").replace(/[^A-Za-z0-9._-]/g, "-");

/**
 * A download name that says what the file is: the set's name, the reduction's
 * short id and the output, e.g. "luxor-long-lens-1a2b3c4d-natural.png".
 * Only letters, digits, dots and dashes, so it needs no quoting in a header.
 */
export function buildOutputDownloadName(setName: string, reductionId: string, path: string): string {
  const set = setName.normalize("NFKD").replace(/[\u0300-\u036f]/g, "").toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 60) || "bracket-set";
  return `${set}-${reductionId.slice(0, 8)}-${headerSafe(path)}`;
}

/** "composite-1a2b3c4d-natural.png": what a composite's file is. */
export function buildCompositeDownloadName(compositeId: string, path: string): string {
  return `composite-${compositeId.slice(0, 8)}-${headerSafe(path)}`;
}

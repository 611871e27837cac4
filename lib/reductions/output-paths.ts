// Which files of a reduction may be served, their content types, download names
// and URLs. Client-safe (no Node or database imports): pages build links with it
// and the files route checks paths with it.

/** The outputs stored under derived/{set}/reductions/{id}/ that the files route serves. */
const OUTPUT_PATTERNS: readonly RegExp[] = [
  /^(master\.fits|natural\.png|structure\.png|preview\.jpg|preview-structure\.jpg|coverage\.png|report\.json)$/,
  /^tiles\/(natural|structure)\.dzi$/,
  /^tiles\/(natural|structure)_files\/\d{1,2}\/\d{1,6}_\d{1,6}\.jpg$/,
  /^tiles\/(natural|structure)-iiif\/info\.json$/,
  /^tiles\/(natural|structure)-iiif\/(full|\d{1,6},\d{1,6},\d{1,6},\d{1,6})\/(max|\d{1,6},\d{0,6}|,\d{1,6})\/0\/default\.jpg$/,
];

const CONTENT_TYPES: Record<string, string> = {
  fits: "application/fits",
  png: "image/png",
  jpg: "image/jpeg",
  json: "application/json",
  dzi: "application/xml",
};

/** True when the path names one of a reduction's outputs; anything else (.., absolute, other names) is refused. */
export function isReductionOutputPath(path: string): boolean {
  return path.length <= 200 && OUTPUT_PATTERNS.some((p) => p.test(path));
}

export function findOutputContentType(path: string): string {
  const ext = path.slice(path.lastIndexOf(".") + 1).toLowerCase();
  return CONTENT_TYPES[ext] ?? "application/octet-stream";
}

/**
 * A download name that says what the file is: the set's name, the reduction's
 * short id and the output, e.g. "luxor-long-lens-1a2b3c4d-natural.png".
 * Only letters, digits, dots and dashes, so it needs no quoting in a header.
 */
export function buildOutputDownloadName(setName: string, reductionId: string, path: string): string {
  const set = setName.normalize("NFKD").replace(/[\u0300-\u036f]/g, "").toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 60) || "bracket-set";
  const file = path.replace(/\//g, "-").replace(/[^A-Za-z0-9._-]/g, "-");
  return `${set}-${reductionId.slice(0, 8)}-${file}`;
}

/** URL of one output as the files route serves it. */
export function buildOutputUrl(reductionId: string, path: string, options: { download?: boolean } = {}): string {
  return `/api/reductions/${encodeURIComponent(reductionId)}/files/${path.split("/").map(encodeURIComponent).join("/")}${options.download ? "?download=1" : ""}`;
}

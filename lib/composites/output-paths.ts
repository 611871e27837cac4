// Which files of a composite may be served, and their URLs. Client-safe (no
// Node or database imports): pages build links with it, the files route checks
// paths with it. Content types are the reductions' (lib/reductions/output-paths.ts).

/** The outputs stored under derived/composites/{id}/ that the files route serves. */
const COMPOSITE_PATTERNS: readonly RegExp[] = [
  /^(master\.fits|natural\.png|structure\.png|preview\.jpg|preview-structure\.jpg|contribution\.jpg|report\.json)$/,
  /^tiles\/(natural|structure)\.dzi$/,
  /^tiles\/(natural|structure)_files\/\d{1,2}\/\d{1,6}_\d{1,6}\.jpg$/,
  /^tiles\/(natural|structure)-iiif\/info\.json$/,
  /^tiles\/(natural|structure)-iiif\/(full|\d{1,6},\d{1,6},\d{1,6},\d{1,6})\/(max|\d{1,6},\d{0,6}|,\d{1,6})\/0\/default\.jpg$/,
];

/** True when the path names one of a composite's outputs; anything else (.., absolute, other names) is refused. */
export function isCompositeOutputPath(path: string): boolean {
  return path.length <= 200 && COMPOSITE_PATTERNS.some((p) => p.test(path));
}

/** URL of one output as the composite files route serves it. */
export function buildCompositeOutputUrl(compositeId: string, path: string, options: { download?: boolean } = {}): string {
  return `/api/composites/${encodeURIComponent(compositeId)}/files/${path.split("/").map(encodeURIComponent).join("/")}${options.download ? "?download=1" : ""}`;
}

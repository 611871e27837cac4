// The shareable view: what the viewer shows, to and from the address bar's
// search parameters. Decoding never throws: a parameter that does not parse is
// ignored and its default used, so a mangled link still opens the plate.
//
//   v=0.51200,0.49800,0.25   centre x and y as fractions of the image's width and
//                            height, and the visible width as a fraction of the
//                            image's width
//   rot=90                   rotation of the view, degrees clockwise
//   r=structure              rendition shown (the first one when absent)
//   cmp=0.5                  curtain comparison on, curtain at this fraction of
//                            the viewer's width (absent: no comparison)
//   o=rings,north,scale      overlays switched on
import { OVERLAY_KEYS, type OverlayKey, type RenditionKey } from "./types";

export interface VisibleRegion {
  centreX: number;
  centreY: number;
  width: number;
}

export interface ViewState {
  region: VisibleRegion | null;
  rotationDeg: number;
  rendition: RenditionKey | null;
  /** Curtain position as a fraction of the viewer's width; null when not comparing. */
  curtain: number | null;
  overlays: OverlayKey[];
}

export const DEFAULT_VIEW_STATE: ViewState = { region: null, rotationDeg: 0, rendition: null, curtain: null, overlays: [] };

/** Our parameter names; encoding replaces exactly these and keeps any others. */
export const VIEW_PARAM_NAMES = ["v", "rot", "r", "cmp", "o"] as const;

const RENDITION_KEYS: readonly RenditionKey[] = ["natural", "structure"];
/** A region whose centre lies this far outside the image, or wider than this, is garbage. */
const CENTRE_MARGIN = 1;
const MAX_WIDTH = 20;
const MIN_WIDTH = 1e-6;
/** Parameters longer than this are not parsed at all. */
const MAX_PARAM_LENGTH = 200;

function readParam(params: URLSearchParams, name: string): string | null {
  const raw = params.get(name);
  return raw === null || raw.length > MAX_PARAM_LENGTH ? null : raw.trim();
}

/** A plain decimal number; rejects "", "1e400", "0x10", "Infinity" and the like. */
function parseDecimal(raw: string): number | null {
  if (!/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d{1,3})?$/.test(raw)) return null;
  const n = Number(raw);
  return Number.isFinite(n) ? n : null;
}

function parseRegion(raw: string | null): VisibleRegion | null {
  if (raw === null) return null;
  const parts = raw.split(",");
  if (parts.length !== 3) return null;
  const [centreX, centreY, width] = parts.map((p) => parseDecimal(p.trim()));
  if (centreX === null || centreY === null || width === null) return null;
  if (centreX < -CENTRE_MARGIN || centreX > 1 + CENTRE_MARGIN || centreY < -CENTRE_MARGIN || centreY > 1 + CENTRE_MARGIN) return null;
  if (!(width >= MIN_WIDTH && width <= MAX_WIDTH)) return null;
  return { centreX, centreY, width };
}

/** Degrees into [0, 360), to a tenth of a degree. */
export function normalizeRotation(deg: number): number {
  const r = Math.round((((deg % 360) + 360) % 360) * 10) / 10;
  return r === 360 ? 0 : r;
}

function parseRotation(raw: string | null): number {
  if (raw === null) return 0;
  const n = parseDecimal(raw);
  return n === null || Math.abs(n) > 1e6 ? 0 : normalizeRotation(n);
}

function parseRendition(raw: string | null, allowed: readonly RenditionKey[]): RenditionKey | null {
  return raw !== null && (allowed as readonly string[]).includes(raw) ? (raw as RenditionKey) : null;
}

function parseCurtain(raw: string | null): number | null {
  if (raw === null) return null;
  const n = parseDecimal(raw);
  return n === null || n < 0 || n > 1 ? null : n;
}

function parseOverlays(raw: string | null): OverlayKey[] {
  if (raw === null) return [];
  const asked = new Set(raw.split(",").map((s) => s.trim()));
  // Canonical order and no repeats, whatever the link said.
  return OVERLAY_KEYS.filter((k) => asked.has(k));
}

/**
 * Reads a view from search parameters (a URLSearchParams or a query string with
 * or without its "?"). `renditions` limits `r` to the keys this plate has.
 */
export function decodeViewState(search: URLSearchParams | string, renditions: readonly RenditionKey[] = RENDITION_KEYS): ViewState {
  let params: URLSearchParams;
  try {
    params = typeof search === "string" ? new URLSearchParams(search) : search;
  } catch {
    return { ...DEFAULT_VIEW_STATE, overlays: [] };
  }
  return {
    region: parseRegion(readParam(params, "v")),
    rotationDeg: parseRotation(readParam(params, "rot")),
    rendition: parseRendition(readParam(params, "r"), renditions),
    curtain: parseCurtain(readParam(params, "cmp")),
    overlays: parseOverlays(readParam(params, "o")),
  };
}

/** Enough digits that a shared deep view lands within a fraction of a screen pixel. */
function formatFraction(v: number): string {
  return String(Number(v.toFixed(5)));
}

function formatWidth(v: number): string {
  return String(Number(v.toPrecision(4)));
}

/**
 * Writes a view into search parameters: ours replaced, others kept as they were.
 * Defaults are left out (no rotation, no comparison, no overlays, first rendition
 * when `defaultRendition` is given), so the plain page keeps a plain address.
 */
export function encodeViewState(state: ViewState, base?: URLSearchParams | string, defaultRendition?: RenditionKey): URLSearchParams {
  const params = new URLSearchParams(base ?? "");
  for (const name of VIEW_PARAM_NAMES) params.delete(name);
  const { region } = state;
  if (region && [region.centreX, region.centreY, region.width].every(Number.isFinite) && region.width > 0) {
    params.set("v", `${formatFraction(region.centreX)},${formatFraction(region.centreY)},${formatWidth(region.width)}`);
  }
  const rot = normalizeRotation(Number.isFinite(state.rotationDeg) ? state.rotationDeg : 0);
  if (rot !== 0) params.set("rot", String(rot));
  if (state.rendition && state.rendition !== defaultRendition) params.set("r", state.rendition);
  if (state.curtain !== null && Number.isFinite(state.curtain)) params.set("cmp", String(Number(Math.min(1, Math.max(0, state.curtain)).toFixed(3))));
  const overlays = OVERLAY_KEYS.filter((k) => state.overlays.includes(k));
  if (overlays.length > 0) params.set("o", overlays.join(","));
  return params;
}

/** The query string for a view, "" when everything is at its default; commas left readable. */
export function formatViewQuery(state: ViewState, base?: URLSearchParams | string, defaultRendition?: RenditionKey): string {
  const query = encodeViewState(state, base, defaultRendition).toString().replace(/%2C/gi, ",");
  return query ? `?${query}` : "";
}

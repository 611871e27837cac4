// The viewer's contract with the plate page: what the page knows about a
// plate's renditions and its sky geometry, in the renditions' own pixels.

import type { PlateGeometry } from "@/db/schema/plates";

export type RenditionKey = "natural" | "structure";

export interface ViewerRendition {
  key: RenditionKey;
  label: string;
  /** URL of a IIIF Image API 3.0 info.json or of a .dzi descriptor */
  tileSource: string;
  width: number;
  height: number;
}

/**
 * In the renditions' own pixel coordinates (both renditions share them): 0-based,
 * x right, y down; solar north in degrees counter-clockwise from image up
 * (unmirrored sky image: east is 90 degrees counter-clockwise from north). Every
 * field optional: an overlay whose data is missing is off and its toggle disabled
 * with the reason. The same shape a plate version stores.
 */
export type ViewerGeometry = PlateGeometry;

/**
 * A map drawn over the renditions on request, in their pixels scaled to its own
 * size (a composite's contribution map: each input's share in its colour).
 */
export interface ViewerMapLayer {
  /** The toggle's label, e.g. "Where each input contributes". */
  label: string;
  /** URL of one plain image (JPEG or PNG) covering the whole rendition. */
  url: string;
  /** What each colour means, shown beside the toggle. */
  legend: { label: string; colour: string }[];
}

export interface PlateViewerProps {
  title: string;
  altText: string;
  renditions: ViewerRendition[];
  geometry: ViewerGeometry;
  mapLayer?: ViewerMapLayer;
}

/** The overlays a visitor can switch on; the keys are also the share link's names. */
export const OVERLAY_KEYS = ["rings", "moon", "north", "scale"] as const;
export type OverlayKey = (typeof OVERLAY_KEYS)[number];

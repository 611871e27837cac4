// The viewer's contract with the plate page: what the page knows about a
// plate's renditions and its sky geometry, in the renditions' own pixels.

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
 * x right, y down. Every field optional: an overlay whose data is missing is off
 * and its toggle disabled with the reason.
 */
export interface ViewerGeometry {
  sunCentre?: { x: number; y: number };
  sunRadiusPx?: number;
  moonCentre?: { x: number; y: number };
  moonRadiusPx?: number;
  /** position angle of solar north in the image, degrees counter-clockwise from image up (unmirrored sky image: east is 90 degrees counter-clockwise from north) */
  solarNorthAngleDeg?: number;
  plateScaleArcsecPerPx?: number;
}

export interface PlateViewerProps {
  title: string;
  altText: string;
  renditions: ViewerRendition[];
  geometry: ViewerGeometry;
}

/** The overlays a visitor can switch on; the keys are also the share link's names. */
export const OVERLAY_KEYS = ["rings", "moon", "north", "scale"] as const;
export type OverlayKey = (typeof OVERLAY_KEYS)[number];

// The OpenSeadragon side of the plate viewer, kept out of React: one viewer
// holding every rendition as a tiled image at the same place (so pan, zoom and
// rotation move them together), the curtain as a cropping polygon on the upper
// image, and a small store of the image-to-screen map that the overlay layer
// reads on every frame. Loaded only in the browser (see plate-viewer.tsx).
import type OpenSeadragon from "openseadragon";
import { deepZoomOptions } from "./deep-zoom-options";
import type { ImageToScreen } from "./overlay-geometry";
import type { RenditionKey, ViewerRendition } from "./types";
import type { VisibleRegion } from "./view-state";

type Osd = typeof OpenSeadragon;

export interface StageFrame {
  transform: ImageToScreen;
  widthPx: number;
  heightPx: number;
}

export interface StageEvents {
  /** After an animation ends (pan, zoom, rotation), and once when the images are in. */
  onSettled: () => void;
  /** As soon as a zoom or a turn is asked for (the target, before the animation runs). */
  onTarget?: () => void;
  /** The hint shown over the image when a one-finger drag or a plain wheel is left to the page. */
  gestureHint: (gesture: "drag" | "scroll", modifierKey: string) => string;
}

/** Keys of OpenSeadragon's own keyboard handling that we switch off: mirroring breaks the overlays' sky directions. */
const BLOCKED_KEY_CODES = new Set(["KeyF", "KeyJ", "KeyK"]);
/** How much one zoom step zooms: a wheel notch, a key press and a button press alike (common practice: about 1.5). */
export const ZOOM_STEP = 1.5;
/**
 * Keys that zoom by one step per press (and per key repeat), handled here: the library's own
 * keyboard zoom runs while a key is held, so a tap zoomed by a barely visible amount.
 */
const ZOOM_KEYS: Record<string, (shift: boolean) => 1 | -1 | 0> = {
  Equal: () => 1,
  NumpadAdd: () => 1,
  Minus: () => -1,
  NumpadSubtract: () => -1,
  ArrowUp: (shift) => (shift ? 1 : 0),
  KeyW: (shift) => (shift ? 1 : 0),
  ArrowDown: (shift) => (shift ? -1 : 0),
  KeyS: (shift) => (shift ? -1 : 0),
};
export const ROTATION_STEP_DEG = 90;
/** The map over the renditions lightens them by its colours ("screen") at this strength, so the corona stays readable under it. */
const MAP_OPACITY = 0.6;
/** Relative zoom and centre offset (in view widths) under which a view counts as the whole image. */
const HOME_TOLERANCE = 0.01;

// The viewer's script starts loading as soon as this module runs in the browser,
// not after the page has hydrated and the component's effect has fired.
const importOpenSeadragon = () => import("openseadragon");
let osdModule: ReturnType<typeof importOpenSeadragon> | null = typeof window === "undefined" ? null : importOpenSeadragon();
function loadOpenSeadragon(): ReturnType<typeof importOpenSeadragon> {
  osdModule ??= importOpenSeadragon();
  return osdModule;
}

export class PlateStage {
  private readonly listeners = new Set<() => void>();
  private frame: StageFrame | null = null;
  private layers = new Map<RenditionKey, OpenSeadragon.TiledImage>();
  /** The map drawn over the renditions on request (ViewerMapLayer), when one was given and loaded. */
  private mapItem: OpenSeadragon.TiledImage | null = null;
  private shown: RenditionKey;
  private curtain: number | null = null;
  private comparePair: [RenditionKey, RenditionKey] | null;

  private constructor(
    private readonly osd: Osd,
    readonly viewer: OpenSeadragon.Viewer,
    private readonly renditions: ViewerRendition[],
    private readonly events: StageEvents,
  ) {
    this.shown = renditions[0].key;
    this.comparePair = renditions.length >= 2 ? [renditions[0].key, renditions[1].key] : null;
  }

  /** Builds the viewer in `host` (an empty element React never renders into) and loads every rendition's pyramid. */
  static async create(
    host: HTMLElement,
    renditions: ViewerRendition[],
    events: StageEvents,
    isCancelled: () => boolean,
    mapUrl?: string,
  ): Promise<{ stage: PlateStage; failed: RenditionKey[] } | null> {
    const osd = (await loadOpenSeadragon()).default;
    // Unmounted while the script loaded (React's development double mount does this): build nothing.
    if (isCancelled()) return null;
    const viewer = osd({
      ...deepZoomOptions(host, { minZoomImageRatio: 0.5, animationTimeS: 0.8, flickEnabled: true }),
      rotationIncrement: ROTATION_STEP_DEG,
      zoomPerScroll: ZOOM_STEP,
    });
    const stage = new PlateStage(osd, viewer, renditions, events);
    stage.listen();
    // Added bottom first: the first rendition ends on top, where the curtain crops it.
    const loads = [...renditions].reverse().map(
      (r) =>
        new Promise<RenditionKey | null>((resolve) => {
          viewer.addTiledImage({
            tileSource: r.tileSource,
            opacity: r.key === stage.shown ? 1 : 0,
            preload: false,
            success: (event) => {
              stage.layers.set(r.key, (event as unknown as { item: OpenSeadragon.TiledImage }).item);
              resolve(null);
            },
            error: () => resolve(r.key),
          });
        }),
    );
    const failed = (await Promise.all(loads)).filter((k): k is RenditionKey => k !== null);
    if (mapUrl) {
      // Last, so on top; placed like every image (width 1 viewport unit), so it covers the renditions exactly.
      await new Promise<void>((resolve) => {
        viewer.addTiledImage({
          tileSource: { type: "image", url: mapUrl, buildPyramid: false },
          opacity: 0,
          compositeOperation: "screen",
          success: (event) => {
            stage.mapItem = (event as unknown as { item: OpenSeadragon.TiledImage }).item;
            resolve();
          },
          error: () => resolve(),
        });
      });
    }
    if (stage.layers.size > 0 && !stage.layers.has(stage.shown)) stage.shown = [...stage.layers.keys()][0];
    stage.applyLayers();
    return { stage, failed };
  }

  private listen(): void {
    this.viewer.addHandler("viewport-change", () => this.refresh());
    this.viewer.addHandler("animation-finish", () => this.events.onSettled());
    this.viewer.addHandler("zoom", () => this.events.onTarget?.());
    this.viewer.addHandler("rotate", () => this.events.onTarget?.());
    this.viewer.addHandler("canvas-key", (event) => {
      const key = event.originalEvent as KeyboardEvent;
      if (BLOCKED_KEY_CODES.has(key.code)) {
        event.preventDefaultAction = true;
        return;
      }
      if (key.ctrlKey || key.altKey || key.metaKey) return;
      const direction = ZOOM_KEYS[key.code]?.(key.shiftKey) ?? 0;
      if (direction !== 0) {
        event.preventDefaultAction = true;
        key.preventDefault();
        this.zoomBy(direction > 0 ? ZOOM_STEP : 1 / ZOOM_STEP);
      }
    });
    this.viewer.addHandler("canvas-cooperative-gesture", (event) => {
      const modifier = /Mac|iPhone|iPad/i.test(navigator.platform || navigator.userAgent || "") ? "⌘" : "Ctrl";
      event.message = this.events.gestureHint(event.gesture, modifier);
    });
  }

  /** The tiled image of a rendition, when it loaded. */
  private layer(key: RenditionKey): OpenSeadragon.TiledImage | undefined {
    return this.layers.get(key);
  }

  private anyLayer(): OpenSeadragon.TiledImage | undefined {
    return this.layers.values().next().value;
  }

  /** Shows one rendition, or the compare pair with the curtain at `curtain` (fraction of the width). */
  setView(shown: RenditionKey, curtain: number | null): void {
    if (this.layers.has(shown)) this.shown = shown;
    this.curtain = curtain !== null && this.comparePair && this.comparePair.every((k) => this.layers.has(k)) ? curtain : null;
    this.applyLayers();
  }

  /** Shows or hides the map over the renditions; false when there is none to show. */
  setMapShown(on: boolean): boolean {
    if (!this.mapItem) return false;
    this.mapItem.setOpacity(on ? MAP_OPACITY : 0);
    return true;
  }

  get hasMap(): boolean {
    return this.mapItem !== null;
  }

  get canCompare(): boolean {
    return !!this.comparePair && this.comparePair.every((k) => this.layers.has(k));
  }

  private applyLayers(): void {
    for (const [key, item] of this.layers) {
      const visible = this.curtain !== null ? this.comparePair!.includes(key) : key === this.shown;
      item.setOpacity(visible ? 1 : 0);
    }
    this.refresh();
  }

  /** Crops the upper image to the left of the curtain and publishes the new map; runs before every draw. */
  private refresh(): void {
    const item = this.anyLayer();
    if (!item) return;
    const size = this.viewer.viewport.getContainerSize();
    const P = this.osd.Point;
    if (this.curtain !== null && this.comparePair) {
      const upper = this.layer(this.comparePair[0])!;
      // A screen rectangle from far left to the curtain, taller than the view, in image pixels:
      // under rotation it becomes a turned rectangle, which a polygon expresses and a clip rect cannot.
      const margin = 4 * (size.x + size.y);
      const x = this.curtain * size.x;
      const corners = [new P(-margin, -margin), new P(x, -margin), new P(x, size.y + margin), new P(-margin, size.y + margin)];
      upper.setCroppingPolygons([corners.map((c) => upper.viewerElementToImageCoordinates(c))]);
    } else {
      for (const layer of this.layers.values()) layer.resetCroppingPolygons();
    }
    const unit = 1000;
    const o = item.imageToViewerElementCoordinates(new P(0, 0));
    const ex = item.imageToViewerElementCoordinates(new P(unit, 0));
    const ey = item.imageToViewerElementCoordinates(new P(0, unit));
    this.frame = {
      transform: {
        origin: { x: o.x, y: o.y },
        xAxis: { x: (ex.x - o.x) / unit, y: (ex.y - o.y) / unit },
        yAxis: { x: (ey.x - o.x) / unit, y: (ey.y - o.y) / unit },
      },
      widthPx: size.x,
      heightPx: size.y,
    };
    for (const listener of this.listeners) listener();
  }

  /** For useSyncExternalStore: the map from image to screen, new on every viewport change. */
  subscribe = (listener: () => void): (() => void) => {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  };

  getFrame = (): StageFrame | null => this.frame;

  /** Magnification relative to the whole image fitted in the viewer (the target while an animation runs). */
  zoomTimes(): number {
    const viewport = this.viewer.viewport;
    return viewport.getZoom(false) / viewport.getHomeZoom();
  }

  rotationDeg(): number {
    const r = this.viewer.viewport.getRotation(false);
    return ((r % 360) + 360) % 360;
  }

  zoomBy(factor: number): void {
    this.viewer.viewport.zoomBy(factor);
    this.viewer.viewport.applyConstraints();
  }

  goHome(): void {
    this.viewer.viewport.goHome();
  }

  rotateBy(deg: number): void {
    const viewport = this.viewer.viewport;
    viewport.setRotation(viewport.getRotation(false) + deg);
  }

  /** The visible region in image fractions (see view-state.ts); null before the images are in and for the whole image. */
  region(): VisibleRegion | null {
    const item = this.anyLayer();
    if (!item) return null;
    const { x: w, y: h } = item.source.dimensions;
    const viewport = this.viewer.viewport;
    const centre = viewport.getCenter(false);
    // The whole image fitted is no particular region: a link to it should fit the whole image on any screen.
    const home = this.viewer.world.getHomeBounds().getCenter();
    const isHome = Math.abs(viewport.getZoom(false) / viewport.getHomeZoom() - 1) < HOME_TOLERANCE && Math.hypot(centre.x - home.x, centre.y - home.y) < HOME_TOLERANCE * (1 / viewport.getZoom(false));
    if (isHome) return null;
    // Every image is placed with a width of 1 viewport unit, so viewport y spans h / w.
    return { centreX: centre.x, centreY: centre.y / (h / w), width: 1 / viewport.getZoom(false) };
  }

  /** Jumps to a shared view. */
  showRegion(region: VisibleRegion | null, rotationDeg: number): void {
    const item = this.anyLayer();
    if (!item) return;
    const viewport = this.viewer.viewport;
    viewport.setRotation(rotationDeg, true);
    if (region) {
      const { x: w, y: h } = item.source.dimensions;
      viewport.panTo(new this.osd.Point(region.centreX, region.centreY * (h / w)), true);
      viewport.zoomTo(1 / region.width, undefined, true);
      viewport.applyConstraints(true);
    }
    this.refresh();
  }

  /** Cooperative gestures protect the page's scrolling; in full page there is no page to protect. */
  setPageScrollFriendly(on: boolean): void {
    (this.viewer as unknown as { setCooperativeGestures?: (on: boolean) => void }).setCooperativeGestures?.(on);
  }

  get canvas(): HTMLElement {
    return this.viewer.canvas;
  }

  destroy(): void {
    this.listeners.clear();
    this.viewer.destroy();
  }
}

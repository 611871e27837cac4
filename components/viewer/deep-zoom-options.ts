// What every deep-zoom viewer of ours asks of OpenSeadragon: our own controls
// instead of its buttons, gestures that leave the page scrollable (two fingers,
// or a modifier with the wheel), tiles fetched for a canvas that may be read,
// no clicking to zoom, no pinching to turn, and near-immediate moves for people
// who ask for less motion.
import type OpenSeadragon from "openseadragon";

export function deepZoomOptions(
  host: HTMLElement,
  { minZoomImageRatio, animationTimeS, flickEnabled = false }: { minZoomImageRatio: number; animationTimeS: number; flickEnabled?: boolean },
): OpenSeadragon.Options {
  // A spring still needs a little time, so "less motion" is a very short animation rather than none.
  const lessMotion = typeof window !== "undefined" && window.matchMedia?.("(prefers-reduced-motion: reduce)").matches;
  return {
    element: host,
    showNavigationControl: false,
    cooperativeGestures: true,
    crossOriginPolicy: "Anonymous",
    visibilityRatio: 0.4,
    minZoomImageRatio,
    maxZoomPixelRatio: 4,
    animationTime: lessMotion ? 0.05 : animationTimeS,
    gestureSettingsMouse: { clickToZoom: false, dblClickToZoom: true },
    gestureSettingsTouch: { pinchRotate: false, ...(flickEnabled ? { flickEnabled } : {}) },
  };
}

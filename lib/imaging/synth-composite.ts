// Synthetic masters of one corona seen through several kits: the scene model of
// synth-scene.ts (Baumbach's K+F corona with streamers, plumes, rays and
// prominences) evaluated in helioprojective arcsec, integrated over each kit's
// pixels, scaled by each camera's gain, with each observer's own Moon and
// photon-like noise. Invented data for tests and the benchmark: the truth is the model.
import { createRng } from "./random";
import { createScene, evaluateCorona, evaluateProminences, type Scene } from "./synth-scene";
import { pixelToHelio, type HelioGrid } from "./composite-geometry";
import type { CompositeInput } from "./composite";

export const RSUN_ARCSEC = 960;
/** The model's own pixel: fine enough for the finest kit (arcsec). */
const SCENE_SCALE = 2;
const SCENE_HALF_PX = 4096;

export interface KitSpec {
  name: string;
  width: number;
  height: number;
  scaleArcsecPerPx: number;
  solarNorthDeg: number;
  /** DN/s per unit of model radiance per arcsec^2 (the camera's gain and throughput). */
  gain: number;
  /** Moon minus Sun, arcsec (west, north). */
  moonArcsec: { lon: number; lat: number };
  /** Where the Sun's centre stands in the picture, px from the image centre. */
  sunOffsetPx?: { dx: number; dy: number };
  /** The WCS's error: its Sun centre this far from the true one, px. */
  wcsErrorPx?: { dx: number; dy: number };
  /** Photon-like noise: sigma^2 = noiseScale x value (DN/s); 0 for none. */
  noiseScale: number;
  seed: number;
  /** Samples per pixel side for the pixel's mean (default 3); colour planes' relative gains (default one plane). */
  subsamples?: number;
  planeGains?: number[];
}

export interface SyntheticSky {
  scene: Scene;
  /** Model radiance per arcsec^2 at a helioprojective point (0 on the Sun's disk). */
  radianceAt: (lonArcsec: number, latArcsec: number) => number;
}

export function createSky(seed = 5): SyntheticSky {
  const size = 2 * SCENE_HALF_PX;
  const scene = createScene({ width: size, height: size, sunRadiusPx: RSUN_ARCSEC / SCENE_SCALE, limbRateDnPerS: 1e4 }, { x: SCENE_HALF_PX, y: SCENE_HALF_PX }, createRng(seed));
  return {
    scene,
    radianceAt: (lon, lat) => {
      // Scene pixels: x toward solar west, y down (toward solar south), the Sun at the centre.
      const x = SCENE_HALF_PX + lon / SCENE_SCALE, y = SCENE_HALF_PX - lat / SCENE_SCALE;
      return evaluateCorona(scene, x, y) + evaluateProminences(scene, x, y);
    },
  };
}

/** A kit's master: each pixel the model's mean over n x n points of it, times gain and pixel area, plus noise; 0 inside its Moon. */
export function renderMaster(sky: SyntheticSky, kit: KitSpec): { input: CompositeInput; trueGrid: HelioGrid } {
  const { width, height } = kit;
  const trueGrid: HelioGrid = {
    width, height, scaleArcsecPerPx: kit.scaleArcsecPerPx, solarNorthDeg: kit.solarNorthDeg,
    sunX: (width - 1) / 2 + (kit.sunOffsetPx?.dx ?? 0), sunY: (height - 1) / 2 + (kit.sunOffsetPx?.dy ?? 0),
  };
  const rng = createRng(kit.seed);
  const planeGains = kit.planeGains ?? [1];
  const planes = planeGains.map(() => new Float32Array(width * height));
  const moonR = 1.03 * RSUN_ARCSEC;
  const area = kit.scaleArcsecPerPx ** 2;
  const n = kit.subsamples ?? 3;
  const offsets = Array.from({ length: n }, (_, k) => (k + 0.5) / n - 0.5);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      let sum = 0;
      for (const oy of offsets) {
        for (const ox of offsets) {
          const w = pixelToHelio(trueGrid, x + ox, y + oy);
          if (Math.hypot(w.lonArcsec - kit.moonArcsec.lon, w.latArcsec - kit.moonArcsec.lat) < moonR) continue;
          sum += sky.radianceAt(w.lonArcsec, w.latArcsec);
        }
      }
      planeGains.forEach((g, c) => {
        const value = (g * kit.gain * area * sum) / (n * n);
        const noise = kit.noiseScale > 0 ? Math.sqrt(kit.noiseScale * Math.max(value, 0) + kit.noiseScale) * 2 * (rng() + rng() + rng() - 1.5) : 0;
        planes[c][y * width + x] = value + noise;
      });
    }
  }
  // The Moon in the master's own pixels, where the picture shows it (a WCS error does not move it).
  const a = (kit.solarNorthDeg * Math.PI) / 180;
  const u = kit.moonArcsec.lon / kit.scaleArcsecPerPx, v = kit.moonArcsec.lat / kit.scaleArcsecPerPx;
  const moonPx = { x: trueGrid.sunX + Math.cos(a) * u - Math.sin(a) * v, y: trueGrid.sunY - Math.sin(a) * u - Math.cos(a) * v };
  const stated: HelioGrid = { ...trueGrid, sunX: trueGrid.sunX + (kit.wcsErrorPx?.dx ?? 0), sunY: trueGrid.sunY + (kit.wcsErrorPx?.dy ?? 0) };
  return {
    input: { name: kit.name, planes, grid: stated, moon: { x: moonPx.x, y: moonPx.y, radiusPx: moonR / kit.scaleArcsecPerPx }, rsunArcsec: RSUN_ARCSEC },
    trueGrid,
  };
}

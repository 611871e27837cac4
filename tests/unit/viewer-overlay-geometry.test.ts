// The plate viewer's overlay maths: rings, solar north and east, scale bars and
// the projection through the viewer's image-to-screen map. The direction
// conventions are those of the viewer contract (components/viewer/types.ts):
// position angle counter-clockwise from image up, east 90 degrees
// counter-clockwise from north on an unmirrored sky image.
import { describe, expect, it } from "vitest";
import {
  arcminToSolarRadii,
  buildOverlayScene,
  computeNorthEastVectors,
  computeOverlayAvailability,
  computeRingRadiiPx,
  describeOverlayScene,
  describeScreenDirection,
  formatArc,
  pickArcLength,
  pickSolarRadiiLength,
  projectDirection,
  projectPoint,
  SCALE_BAR_MAX_FRACTION,
  SCALE_BAR_MIN_FRACTION,
  screenPxPerImagePx,
  solarRadiusArcmin,
  type ImageToScreen,
} from "@/components/viewer/overlay-geometry";
import type { OverlayKey, ViewerGeometry } from "@/components/viewer/types";

const near = (v: { x: number; y: number }, x: number, y: number) => {
  expect(v.x).toBeCloseTo(x, 12);
  expect(v.y).toBeCloseTo(y, 12);
};

/** The map OpenSeadragon gives: scale s, clockwise rotation by deg (y down), then a shift. */
function similarity(s: number, deg: number, shift = { x: 0, y: 0 }): ImageToScreen {
  const a = (deg * Math.PI) / 180;
  return {
    origin: shift,
    xAxis: { x: s * Math.cos(a), y: s * Math.sin(a) },
    yAxis: { x: -s * Math.sin(a), y: s * Math.cos(a) },
  };
}

describe("solar north and east in image coordinates", () => {
  it("angle 0: north straight up, east to the left", () => {
    const { north, east } = computeNorthEastVectors(0);
    near(north, 0, -1);
    near(east, -1, 0);
  });

  it("angle 90: north points left, east points down", () => {
    const { north, east } = computeNorthEastVectors(90);
    near(north, -1, 0);
    near(east, 0, 1);
  });

  it("angle 180 turns both round; angle -90 equals 270", () => {
    const half = computeNorthEastVectors(180);
    near(half.north, 0, 1);
    near(half.east, 1, 0);
    const a = computeNorthEastVectors(-90);
    const b = computeNorthEastVectors(270);
    near(a.north, b.north.x, b.north.y);
    near(a.north, 1, 0);
  });

  it("east is always north turned a quarter counter-clockwise on screen, both unit length", () => {
    for (const deg of [-200, -33.3, 0, 12.5, 45, 123, 359.9]) {
      const { north, east } = computeNorthEastVectors(deg);
      expect(Math.hypot(north.x, north.y)).toBeCloseTo(1, 12);
      // With y down, a quarter turn counter-clockwise maps (x, y) to (y, -x).
      near(east, north.y, -north.x);
    }
  });

  it("refuses a non-finite angle", () => {
    expect(() => computeNorthEastVectors(Number.NaN)).toThrow(RangeError);
  });
});

describe("rings and the solar radius", () => {
  it("rings at 1, 2, 3 and 4 solar radii", () => {
    expect(computeRingRadiiPx(250)).toEqual([250, 500, 750, 1000]);
    expect(() => computeRingRadiiPx(0)).toThrow(RangeError);
  });

  it("solar radius in arcminutes from the plate scale, and back", () => {
    // 959.63 arcsec, the solar semi-diameter at 1 au (REFERENCES.md, Auwers),
    // imaged at 3.8386 arcsec/px is 250 px: 15.994 arcmin (computed).
    expect(solarRadiusArcmin(250, 959.63 / 250)).toBeCloseTo(959.63 / 60, 10);
    expect(arcminToSolarRadii(959.63 / 60, 250, 959.63 / 250)).toBeCloseTo(1, 12);
    expect(arcminToSolarRadii(32, 250, 3.84)).toBeCloseTo(32 / 16, 12);
    expect(() => solarRadiusArcmin(250, 0)).toThrow(RangeError);
  });
});

describe("projection through the viewer's map", () => {
  it("keeps circles centred on the Sun under rotation and scales radii", () => {
    const sun = { x: 1200, y: 800 };
    for (const deg of [0, 90, 137, 270]) {
      const t = similarity(0.25, deg, { x: 40, y: -10 });
      expect(screenPxPerImagePx(t)).toBeCloseTo(0.25, 12);
      // A point one radius away stays one scaled radius from the projected centre.
      const c = projectPoint(t, sun);
      const edge = projectPoint(t, { x: sun.x + 300, y: sun.y });
      expect(Math.hypot(edge.x - c.x, edge.y - c.y)).toBeCloseTo(75, 9);
    }
  });

  it("turns image directions with the view: north up in the image points right after a quarter turn clockwise", () => {
    const north = computeNorthEastVectors(0).north;
    near(projectDirection(similarity(3, 90), north), 1, 0);
    expect(describeScreenDirection(projectDirection(similarity(3, 90), north))).toBe("right");
    expect(describeScreenDirection(projectDirection(similarity(3, 0), north))).toBe("up");
    expect(describeScreenDirection({ x: -1, y: -1 })).toBe("up and to the left");
    expect(describeScreenDirection({ x: 0.2, y: 1 })).toBe("down");
  });

  it("builds only the overlays that are on and available, in screen pixels", () => {
    const g: ViewerGeometry = { sunCentre: { x: 100, y: 100 }, sunRadiusPx: 50, moonCentre: { x: 102, y: 99 }, moonRadiusPx: 52, solarNorthAngleDeg: 90, plateScaleArcsecPerPx: 19.2 };
    const t = similarity(2, 90);
    const scene = buildOverlayScene(t, g, new Set<OverlayKey>(["rings", "north", "scale"]), 800);
    expect(scene.rings.map((r) => r.radiusPx)).toEqual([100, 200, 300, 400]);
    near(scene.rings[0].centre, -200, 200);
    expect(scene.moon).toBeNull();
    // North points left in the image; the view turns it a quarter clockwise: up on screen.
    near(scene.compass!.north, 0, -1);
    expect(scene.scaleBars).toHaveLength(2);
    for (const bar of scene.scaleBars) {
      expect(bar.lengthPx).toBeGreaterThanOrEqual(SCALE_BAR_MIN_FRACTION * 800);
      expect(bar.lengthPx).toBeLessThanOrEqual(SCALE_BAR_MAX_FRACTION * 800);
    }
  });

  it("draws nothing whose data is missing, even when asked", () => {
    const scene = buildOverlayScene(similarity(1, 0), {}, new Set<OverlayKey>(["rings", "moon", "north", "scale"]), 800);
    expect(scene).toEqual({ rings: [], moon: null, compass: null, scaleBars: [] });
  });
});

describe("which overlays a plate can show", () => {
  it("each needs its own data, and says why it is off", () => {
    const none = computeOverlayAvailability({});
    for (const key of ["rings", "moon", "north", "scale"] as const) {
      expect(none[key].available).toBe(false);
      expect(none[key].reason).toMatch(/\w+/);
    }
    const sunOnly = computeOverlayAvailability({ sunCentre: { x: 1, y: 2 }, sunRadiusPx: 10 });
    expect(sunOnly.rings.available).toBe(true);
    expect(sunOnly.scale.available).toBe(true);
    expect(sunOnly.moon.available).toBe(false);
    expect(computeOverlayAvailability({ sunRadiusPx: 10 }).rings.available).toBe(false);
    expect(computeOverlayAvailability({ solarNorthAngleDeg: 0 }).north.available).toBe(true);
    expect(computeOverlayAvailability({ sunCentre: { x: Number.NaN, y: 0 }, sunRadiusPx: 5 }).rings.available).toBe(false);
  });
});

describe("scale bar lengths", () => {
  it("stays between 15 % and 40 % of the viewer width from arcseconds to degrees", () => {
    for (const width of [320, 390, 1280]) {
      // From 0.001 to 100 arcsec per screen pixel, in steps of about 7 %.
      for (let e = -3; e <= 2; e += 0.03) {
        const arcsecPerPx = 10 ** e;
        const bar = pickArcLength(arcsecPerPx, width);
        expect(bar.lengthPx / width).toBeGreaterThanOrEqual(SCALE_BAR_MIN_FRACTION);
        expect(bar.lengthPx / width).toBeLessThanOrEqual(SCALE_BAR_MAX_FRACTION);
        expect(bar.lengthPx * arcsecPerPx).toBeCloseTo(bar.value, 9);
      }
      for (let e = -5; e <= 0; e += 0.03) {
        const bar = pickSolarRadiiLength(10 ** e, width);
        expect(bar.lengthPx / width).toBeGreaterThanOrEqual(SCALE_BAR_MIN_FRACTION);
        expect(bar.lengthPx / width).toBeLessThanOrEqual(SCALE_BAR_MAX_FRACTION);
      }
    }
  });

  it("picks round lengths and labels them in the unit that reads best", () => {
    // 1000 px wide, 3 arcsec per px: 40 % is 1200 arcsec, exactly 20 arcmin.
    expect(pickArcLength(3, 1000).value).toBe(1200);
    expect(formatArc(1200)).toBe("20′");
    expect(formatArc(30)).toBe("30″");
    expect(formatArc(7200)).toBe("2°");
    expect(pickSolarRadiiLength(0.004, 1000).value).toBe(1);
  });
});

describe("overlays in words", () => {
  it("says where north points on screen and how long the scale bars are", () => {
    const g: ViewerGeometry = { sunCentre: { x: 500, y: 500 }, sunRadiusPx: 100, solarNorthAngleDeg: 0, plateScaleArcsecPerPx: 9.6 };
    // 1000 px wide at 1 screen px per image px: 40 % is 400 px = 3840 arcsec, so 1 degree; 4 solar radii fit, 2 is the round length.
    const text = describeOverlayScene(buildOverlayScene(similarity(1, 0), g, new Set<OverlayKey>(["rings", "north", "scale"]), 1000));
    expect(text).toContain("Solar north points up on screen, east points left.");
    expect(text).toContain("Scale bar: 1 degree; 2 solar radii.");
    expect(text).toContain("Rings mark 1, 2, 3 and 4 solar radii");
    expect(describeOverlayScene(buildOverlayScene(similarity(1, 180), g, new Set<OverlayKey>(["north"]), 1000))).toBe("Solar north points down on screen, east points right.");
  });
});

// The north angle from the kit's mount, on the command line.
import { describe, expect, it } from "vitest";
import { computeNorthAngleInImageDeg } from "@/lib/astro/mount-rotation";
import { parseReduceArgs } from "@/lib/reduction-runner/cli-args";

describe("--mount and the camera on it", () => {
  it("reads the mount, roll and flips", () => {
    const a = parseReduceArgs(["--out", "o", "--mount", "alt-az", "--camera-roll", "-3.5", "--flip-h", "f1.fits"]);
    expect(a.camera).toEqual({ mount: "alt-az", cameraRollDeg: -3.5, flipHorizontal: true, flipVertical: false });
    expect(a.northAngleDeg).toBeUndefined();
  });

  it("refuses an unknown mount, naming the option and the choices", () => {
    expect(() => parseReduceArgs(["--out", "o", "--mount", "dobsonian", "f.fits"])).toThrow(/--mount: expected one of equatorial, alt-az/);
  });

  it("refuses both an angle and a mount", () => {
    expect(() => parseReduceArgs(["--out", "o", "--mount", "equatorial", "--north-angle", "10", "f.fits"])).toThrow(/--north-angle and --mount/);
  });

  it("refuses flips without a mount", () => {
    expect(() => parseReduceArgs(["--out", "o", "--flip-v", "f.fits"])).toThrow(/give --mount too/);
  });

  it("on an equatorial mount squared to north, north is image up whatever the time (lib/astro)", () => {
    const site = { latDeg: 25.69, lonDeg: 32.64, elevationM: 80 };
    for (const t of [Date.UTC(2027, 7, 2, 9), Date.UTC(2027, 7, 2, 11)]) {
      expect(computeNorthAngleInImageDeg({ mount: "equatorial" }, site, t)).toBeCloseTo(0, 9);
    }
    // A hand-held camera gives no reference: the runner then estimates the angle from the bracket.
    expect(computeNorthAngleInImageDeg({ mount: "hand-held" }, site, Date.UTC(2027, 7, 2, 10))).toBeNull();
  });
});

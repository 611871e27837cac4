// The plate viewer's shareable view: round trips through the address bar and
// links that have been cut, mangled or made up.
import { describe, expect, it } from "vitest";
import { DEFAULT_VIEW_STATE, decodeViewState, encodeViewState, formatViewQuery, normalizeRotation, type ViewState } from "@/components/viewer/view-state";

const full: ViewState = {
  region: { centreX: 0.512, centreY: 0.498, width: 0.25 },
  rotationDeg: 90,
  rendition: "structure",
  curtain: 0.5,
  overlays: ["rings", "north", "scale"],
};

describe("share link round trip", () => {
  it("reads back what it wrote", () => {
    const query = formatViewQuery(full);
    expect(query).toBe("?v=0.512,0.498,0.25&rot=90&r=structure&cmp=0.5&o=rings,north,scale");
    expect(decodeViewState(query)).toEqual(full);
  });

  it("keeps deep views precise: centre to 1e-5 of the image, width to 4 significant digits", () => {
    const deep: ViewState = { ...DEFAULT_VIEW_STATE, region: { centreX: 0.123456789, centreY: 0.87654321, width: 0.000123456 } };
    const back = decodeViewState(encodeViewState(deep)).region!;
    expect(back.centreX).toBeCloseTo(0.12346, 10);
    expect(back.centreY).toBeCloseTo(0.87654, 10);
    expect(back.width).toBe(0.0001235);
  });

  it("leaves defaults out and keeps other parameters", () => {
    const params = encodeViewState({ ...DEFAULT_VIEW_STATE, rendition: "natural" }, "?from=gallery&v=1,1,1&o=moon", "natural");
    expect(params.toString()).toBe("from=gallery");
    expect(formatViewQuery(DEFAULT_VIEW_STATE)).toBe("");
  });

  it("writes overlays in one order without repeats, and rotations in [0, 360)", () => {
    expect(encodeViewState({ ...DEFAULT_VIEW_STATE, overlays: ["scale", "rings", "scale"], rotationDeg: -90 }).toString()).toBe("rot=270&o=rings%2Cscale");
    expect(normalizeRotation(720)).toBe(0);
    expect(normalizeRotation(-0.04)).toBe(0);
    expect(normalizeRotation(359.96)).toBe(0);
    expect(normalizeRotation(450)).toBe(90);
  });
});

describe("garbage in the address bar", () => {
  const garbage = [
    "v=abc&rot=north&r=infrared&cmp=2&o=",
    "v=0.5,0.5&rot=&cmp=-0.1",
    "v=0.5,0.5,0&rot=1e999&cmp=NaN",
    "v=0.5,0.5,-1",
    "v=NaN,0.5,0.2&cmp=Infinity",
    "v=0x10,0.5,0.2&rot=0x5a",
    "v=0.5,,0.2,0.1&o=,,,",
    "v=99,0.5,0.2",
    "v=0.5,0.5,1000",
    `v=${"9".repeat(500)},0.5,0.2`,
    "%E0%A4%A&v=%ZZ&o=%",
    "o=rings%00,scale&r=struct%00ure",
    "r=constructor&o=__proto__,toString",
  ];

  for (const query of garbage) {
    it(`ignores ${JSON.stringify(query.slice(0, 40))}`, () => {
      const state = decodeViewState(query);
      expect(state.region).toBeNull();
      expect(state.rendition).toBeNull();
      expect(state.curtain).toBeNull();
      expect(state.rotationDeg).toBe(0);
      for (const o of state.overlays) expect(["rings", "moon", "north", "scale"]).toContain(o);
    });
  }

  it("keeps the good parameters beside bad ones", () => {
    const state = decodeViewState("?v=0.5,0.4,0.1&rot=oops&r=structure&o=rings,lasers,moon,rings&cmp=0.25");
    expect(state).toEqual({ region: { centreX: 0.5, centreY: 0.4, width: 0.1 }, rotationDeg: 0, rendition: "structure", curtain: 0.25, overlays: ["rings", "moon"] });
  });

  it("forgives spaces around values, as pasted links carry them", () => {
    expect(decodeViewState("r=structure%20&cmp=%200.5").rendition).toBe("structure");
    expect(decodeViewState("o=%20rings%20,scale").overlays).toEqual(["rings", "scale"]);
  });

  it("accepts a rendition only if the plate has it", () => {
    expect(decodeViewState("r=structure", ["natural"]).rendition).toBeNull();
    expect(decodeViewState("r=natural", ["natural"]).rendition).toBe("natural");
  });

  it("takes the first of repeated parameters and reads rotations of any sign", () => {
    expect(decodeViewState("rot=-90&rot=10").rotationDeg).toBe(270);
    expect(decodeViewState(new URLSearchParams("cmp=0&cmp=1")).curtain).toBe(0);
  });
});

// IIIF Presentation 3.0 documents of a plate, read back by @iiif/parser; the
// required fields are those of the specification (shared/REFERENCES.md:
// Manifest with id, type, label as a language map, items of Canvas with width
// and height; rights a Creative Commons or RightsStatements.org URI).
import { normalize } from "@iiif/parser";
import { describe, expect, it } from "vitest";
import { plateCreditLine } from "@/lib/plates/credit";
import { buildEclipseCollection, buildPlateManifest, toIiifText } from "@/lib/plates/iiif";
import { LICENCE_INFO } from "@/lib/plates/licences";
import type { PublicPlateDto } from "@/lib/plates/public";

// normalize() types its entity stores loosely; the tests read them as records.
type Store = Record<string, Record<string, any>>; // eslint-disable-line @typescript-eslint/no-explicit-any
const storeOf = (parsed: ReturnType<typeof normalize>, type: string): Store => (parsed.entities as unknown as Record<string, Store>)[type];

const APP = "https://gallery.kestrel-ridge.example";
const RID = "3f1c2d4e-5a6b-4c7d-8e9f-0a1b2c3d4e5f";

function plate(overrides: Partial<PublicPlateDto> = {}): PublicPlateDto {
  return {
    slug: "luxor-corona-2027",
    title: "The corona over Luxor",
    caption: "Streamers to four solar radii.",
    altText: "A dark Moon ringed by pearly streamers.",
    eclipseId: "2027-08-02",
    siteCountry: "Egypt",
    siteLabel: "Luxor",
    sitePosition: { latDeg: 25.7, lonDeg: 32.6, precision: "rounded" },
    photographer: "Oskar Lindqvist",
    isComposite: false,
    renditions: ["natural", "structure"],
    previewUrl: `/iiif/reductions/${RID}/preview.jpg`,
    publishedAt: "2027-08-20T10:00:00.000Z",
    version: 1,
    isCurrentVersion: true,
    description: "",
    acquiredBy: "Oskar Lindqvist",
    processedBy: "crownlight-imaging 0.1.0",
    licence: LICENCE_INFO["CC-BY-4.0"],
    site: { label: "Luxor", kind: "fixed", position: { latDeg: 25.7, lonDeg: 32.6, precision: "rounded" } },
    kit: { name: "Refractor", camera: "Mono camera", focalMm: 600, fNumber: 7 },
    exposuresS: [0.002, 0.008, 0.033, 0.125],
    captureSpan: { start: "2027-08-02T10:04:40.001Z", end: "2027-08-02T10:04:46.062Z" },
    renditionFiles: [
      { key: "natural", width: 6000, height: 4000, iiifInfoUrl: `/iiif/reductions/${RID}/natural-iiif/info.json`, dziUrl: `/iiif/reductions/${RID}/natural.dzi` },
      { key: "structure", width: 6000, height: 4000, iiifInfoUrl: `/iiif/reductions/${RID}/structure-iiif/info.json`, dziUrl: `/iiif/reductions/${RID}/structure.dzi` },
    ],
    geometry: {},
    disclosure: { pipelineVersion: "crownlight-imaging 0.1.0", registration: "sun", filter: "mgn", filterStrength: 0.3, stages: [], moonSilhouetteUtc: null, referenceFrame: null, dynamicRangeStops: null },
    downloads: [{ kind: "master", label: "Master, FITS", url: `/iiif/reductions/${RID}/master.fits?name=corona-v1-master.fits`, format: "application/fits", fileName: "corona-v1-master.fits" }],
    versions: [],
    withdrawn: null,
    source: { kind: "reduction", id: RID },
    composite: null,
    ...overrides,
  };
}

describe("plate manifest", () => {
  const credit = plateCreditLine("{acquiredBy} / {society}; processing: {processedBy}", "Kestrel Ridge Astronomical Society", { ...plate(), licence: "CC-BY-4.0" });
  const manifest = buildPlateManifest(plate(), APP, credit);

  it("carries the fields Presentation 3.0 requires and parses without loss", () => {
    expect(manifest["@context"]).toBe("http://iiif.io/api/presentation/3/context.json");
    const parsed = normalize(structuredClone(manifest));
    expect(parsed.resource).toEqual({ id: `${APP}/iiif/plates/luxor-corona-2027/manifest.json`, type: "Manifest" });
    const m = storeOf(parsed, "Manifest")[`${APP}/iiif/plates/luxor-corona-2027/manifest.json`];
    expect(m.label).toEqual({ en: ["The corona over Luxor"] });
    expect(m.items).toHaveLength(2);
    for (const ref of m.items) {
      const canvas = storeOf(parsed, "Canvas")[ref.id];
      expect(canvas.width).toBe(6000);
      expect(canvas.height).toBe(4000);
      expect(canvas.items).toHaveLength(1);
    }
    expect(m.rights).toBe("http://creativecommons.org/licenses/by/4.0/");
    expect(m.requiredStatement?.value).toEqual({ en: ["Oskar Lindqvist / Kestrel Ridge Astronomical Society; processing: crownlight-imaging 0.1.0"] });
  });

  it("paints each canvas with an image that offers its level-0 Image API service", () => {
    const parsed = normalize(structuredClone(manifest));
    const annotations = Object.values(storeOf(parsed, "Annotation"));
    expect(annotations).toHaveLength(2);
    const services = Object.values(storeOf(parsed, "Service")) as { id?: string; type?: string; profile?: string }[];
    expect(services.map((s) => s.id).sort()).toEqual([`${APP}/iiif/reductions/${RID}/natural-iiif`, `${APP}/iiif/reductions/${RID}/structure-iiif`]);
    expect(services.every((s) => s.type === "ImageService3" && s.profile === "level0")).toBe(true);
  });

  it("links the FITS master only when the licence offers downloads", () => {
    expect(manifest.seeAlso).toEqual([expect.objectContaining({ id: `${APP}/iiif/reductions/${RID}/master.fits`, format: "application/fits", type: "Dataset" })]);
    const closed = buildPlateManifest(plate({ licence: LICENCE_INFO["all-rights-reserved"], downloads: [] }), APP, "Oskar Lindqvist / KRAS");
    expect(closed.seeAlso).toBeUndefined();
    expect(closed.rights).toBe("http://rightsstatements.org/vocab/InC/1.0/");
  });

  it("names an older version's manifest by its version", () => {
    const old = buildPlateManifest(plate({ version: 1, isCurrentVersion: false }), APP, "Oskar Lindqvist / KRAS");
    expect(old.id).toBe(`${APP}/iiif/plates/luxor-corona-2027/v/1/manifest.json`);
  });
});

describe("text values cannot be taken for HTML (Presentation 3.0, section 4.4)", () => {
  // A value that begins with "<" is HTML to a conforming viewer; ours are plain text.
  const hostile = '<img src=x onerror="alert(1)">';
  const m = buildPlateManifest(
    plate({ title: hostile, caption: `${hostile} caption`, acquiredBy: hostile, siteLabel: hostile, site: { label: hostile, kind: "fixed", position: { latDeg: 25.7, lonDeg: 32.6, precision: "rounded" } } }),
    APP,
    hostile,
  ) as { label: { en: string[] }; summary: { en: string[] }; metadata: { value: { en: string[] } }[]; requiredStatement: { value: { en: string[] } } };
  const htmlValues = [...m.summary.en, ...m.metadata.flatMap((x) => x.value.en), ...m.requiredStatement.value.en];

  it("sends no value that a viewer would read as an element other than an escaped span", () => {
    for (const v of htmlValues) {
      if (v.startsWith("<")) {
        // HTML by the rule: then it must be one span whose content holds no tag.
        expect(v).toMatch(/^<span>[^<>]*<\/span>$/);
      }
      // Never the raw tag at the start, where the spec makes it HTML.
      expect(v.startsWith("<img")).toBe(false);
    }
    expect(m.requiredStatement.value.en[0]).toBe("<span>&lt;img src=x onerror=&quot;alert(1)&quot;&gt;</span>");
  });

  it("keeps text that does not begin with '<' as it was typed", () => {
    expect(m.summary.en[0]).toBe("<span>&lt;img src=x onerror=&quot;alert(1)&quot;&gt; caption</span>");
    expect(toIiifText("Streamers & plumes, see <b>north</b>")).toBe("Streamers & plumes, see <b>north</b>");
  });

  it("labels, which take no HTML at all, never begin with '<'", () => {
    expect(m.label.en[0].startsWith("<")).toBe(false);
    expect(m.label.en[0]).toBe(`\u200b${hostile}`);
  });
});

describe("eclipse collection", () => {
  it("lists each plate's manifest and parses as a Collection", () => {
    const c = buildEclipseCollection("2027-08-02", [plate(), plate({ slug: "cadiz-inner-corona", title: "Inner corona from Cadiz" })], APP);
    const parsed = normalize(structuredClone(c));
    expect(parsed.resource.type).toBe("Collection");
    const col = storeOf(parsed, "Collection")[`${APP}/iiif/eclipses/2027-08-02/collection.json`];
    expect(col.items.map((i: { id: string }) => i.id)).toEqual([`${APP}/iiif/plates/luxor-corona-2027/manifest.json`, `${APP}/iiif/plates/cadiz-inner-corona/manifest.json`]);
  });
});

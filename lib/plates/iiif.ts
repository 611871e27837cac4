// IIIF Presentation API 3.0 documents for published plates: a Manifest per
// plate (one Canvas per rendition, each painted by an image with its level-0
// Image API service), and a Collection per eclipse. Pure functions of the
// public DTOs and the site's base URL.
import type { PlateCardDto, PublicPlateDto } from "./public";

const PRESENTATION_CONTEXT = "http://iiif.io/api/presentation/3/context.json";
type LanguageMap = Record<string, string[]>;
const en = (text: string): LanguageMap => ({ en: [text] });
const label = (name: string, value: string) => ({ label: en(name), value: en(value) });

export function manifestUrl(appUrl: string, slug: string, version?: number): string {
  return `${appUrl}/iiif/plates/${slug}${version ? `/v/${version}` : ""}/manifest.json`;
}

export function collectionUrl(appUrl: string, eclipseId: string): string {
  return `${appUrl}/iiif/eclipses/${eclipseId}/collection.json`;
}

/** `credit` is the plate's credit line (lib/plates/credit.ts), the manifest's required statement. */
export function buildPlateManifest(plate: PublicPlateDto, appUrl: string, credit: string): Record<string, unknown> {
  const id = manifestUrl(appUrl, plate.slug, plate.isCurrentVersion ? undefined : plate.version);
  const filesBase = `${appUrl}/iiif/reductions/${plate.reductionId}`;
  const metadata = [
    label("Eclipse", `Total solar eclipse of ${plate.eclipseId}`),
    label("Site", plate.site.position ? `${plate.site.name} (${plate.site.position.latDeg.toFixed(plate.site.position.precision === "exact" ? 4 : 1)}°, ${plate.site.position.lonDeg.toFixed(plate.site.position.precision === "exact" ? 4 : 1)}°)` : plate.site.name),
    ...(plate.captureSpan ? [label("Time (UTC)", `${plate.captureSpan.start} to ${plate.captureSpan.end}`)] : []),
    ...(plate.kit ? [label("Instrument", `${plate.kit.camera}, ${plate.kit.focalMm} mm f/${plate.kit.fNumber}`)] : []),
    ...(plate.exposuresS.length ? [label("Exposures (s)", plate.exposuresS.map((e) => e.toPrecision(3)).join(", "))] : []),
    label("Data acquired by", plate.acquiredBy),
    label("Processed by", plate.processedBy),
    label("Version", String(plate.version)),
    ...(plate.disclosure.pipelineVersion ? [label("Pipeline", plate.disclosure.pipelineVersion)] : []),
  ];
  const items = plate.renditionFiles.map((r) => {
    const canvasId = `${id.replace(/\/manifest\.json$/, "")}/canvas/${r.key}`;
    return {
      id: canvasId,
      type: "Canvas",
      label: en(r.key === "natural" ? "Natural rendition" : "Structure rendition (radial filter)"),
      width: r.width,
      height: r.height,
      items: [
        {
          id: `${canvasId}/page`,
          type: "AnnotationPage",
          items: [
            {
              id: `${canvasId}/page/image`,
              type: "Annotation",
              motivation: "painting",
              target: canvasId,
              body: {
                // A static whole image; viewers that speak IIIF zoom through the level-0 service's tiles.
                id: `${filesBase}/preview.jpg`,
                type: "Image",
                format: "image/jpeg",
                service: [{ id: `${filesBase}/${r.key}-iiif`, type: "ImageService3", profile: "level0" }],
              },
            },
          ],
        },
      ],
    };
  });
  return {
    "@context": PRESENTATION_CONTEXT,
    id,
    type: "Manifest",
    label: en(plate.title),
    ...(plate.caption ? { summary: en(plate.caption) } : {}),
    metadata,
    requiredStatement: label("Attribution", credit),
    rights: plate.licence.rightsUri,
    homepage: [{ id: `${appUrl}/plates/${plate.slug}${plate.isCurrentVersion ? "" : `/v/${plate.version}`}`, type: "Text", label: en(plate.title), format: "text/html" }],
    ...(plate.downloads.some((d) => d.format === "application/fits")
      ? { seeAlso: [{ id: `${filesBase}/master.fits`, type: "Dataset", label: en("Master image, FITS with helioprojective WCS"), format: "application/fits" }] }
      : {}),
    items,
  };
}

export function buildEclipseCollection(eclipseId: string, plates: PlateCardDto[], appUrl: string): Record<string, unknown> {
  return {
    "@context": PRESENTATION_CONTEXT,
    id: collectionUrl(appUrl, eclipseId),
    type: "Collection",
    label: en(`Plates of the total solar eclipse of ${eclipseId}`),
    items: plates.map((p) => ({ id: manifestUrl(appUrl, p.slug), type: "Manifest", label: en(p.title) })),
  };
}

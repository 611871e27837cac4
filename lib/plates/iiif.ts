// IIIF Presentation API 3.0 documents for published plates: a Manifest per
// plate (one Canvas per rendition, each painted by an image with its level-0
// Image API service), and a Collection per eclipse. Pure functions of the
// public DTOs and the site's base URL.
import type { PlateCardDto, PublicPlateDto } from "./public";
import { plateFilesBase } from "./source";

const PRESENTATION_CONTEXT = "http://iiif.io/api/presentation/3/context.json";
type LanguageMap = Record<string, string[]>;

const escapeHtml = (text: string) => text.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");

/**
 * Presentation 3.0 section 4.4: in summary and in the values of metadata and
 * requiredStatement, a string that begins with "<" is HTML (clients keep a few
 * tags and drop the rest). Our texts are plain text typed by people, so one that
 * begins with "<" is sent as an HTML span holding the escaped text: a viewer
 * shows the characters as typed, and no tag of theirs ever reaches it. Any
 * other string is plain text to every conforming viewer.
 */
export function toIiifText(text: string): string {
  return text.startsWith("<") ? `<span>${escapeHtml(text)}</span>` : text;
}

/**
 * Labels take no HTML at all (section 4.4); a label that begins with "<" gets a
 * zero-width space in front, so that no viewer mistakes it for markup.
 */
export function toIiifLabel(text: string): string {
  return text.startsWith("<") ? `\u200b${text}` : text;
}

const en = (text: string): LanguageMap => ({ en: [toIiifLabel(text)] });
const enText = (text: string): LanguageMap => ({ en: [toIiifText(text)] });
const label = (name: string, value: string) => ({ label: en(name), value: enText(value) });

export function manifestUrl(appUrl: string, slug: string, version?: number): string {
  return `${appUrl}/iiif/plates/${slug}${version ? `/v/${version}` : ""}/manifest.json`;
}

export function collectionUrl(appUrl: string, eclipseId: string): string {
  return `${appUrl}/iiif/eclipses/${eclipseId}/collection.json`;
}

/** The site as the public may see it: its public label, country and position at its precision; nothing for a hidden site. */
function describeSite(plate: PublicPlateDto): string {
  if (plate.composite) {
    return plate.composite.inputs.map((i) => `${i.photographer}: ${describePosition(i.site.label, null, i.site.position)}`).join("; ");
  }
  return describePosition(plate.site.label, plate.siteCountry, plate.site.position);
}

function describePosition(siteLabel: string | null, country: string | null, pos: PublicPlateDto["site"]["position"]): string {
  if (!pos) return "kept private by the observer";
  const digits = pos.precision === "exact" ? 4 : 1;
  const place = [siteLabel, country].filter(Boolean).join(", ");
  const where = `${pos.latDeg.toFixed(digits)}°, ${pos.lonDeg.toFixed(digits)}°${pos.precision === "rounded" ? ", rounded to about 10 km" : ""}`;
  return place ? `${place} (${where})` : where;
}

/** `credit` is the plate's credit line (lib/plates/credit.ts), the manifest's required statement. */
export function buildPlateManifest(plate: PublicPlateDto, appUrl: string, credit: string): Record<string, unknown> {
  const id = manifestUrl(appUrl, plate.slug, plate.isCurrentVersion ? undefined : plate.version);
  const filesBase = `${appUrl}${plateFilesBase(plate.source)}`;
  const metadata = [
    label("Eclipse", `Total solar eclipse of ${plate.eclipseId}`),
    label("Site", describeSite(plate)),
    ...(plate.captureSpan ? [label("Time (UTC)", `${plate.captureSpan.start} to ${plate.captureSpan.end}`)] : []),
    ...(plate.kit ? [label("Instrument", `${plate.kit.camera}, ${plate.kit.focalMm} mm f/${plate.kit.fNumber}`)] : []),
    ...(plate.composite
      ? [label("Composed from", plate.composite.inputs.map((i) => `${i.photographer}${i.kit ? ` (${i.kit.camera}, ${i.kit.focalMm} mm)` : ""}`).join("; "))]
      : []),
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
    ...(plate.caption ? { summary: enText(plate.caption) } : {}),
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

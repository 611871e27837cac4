// What every exported file of a plate says about itself. Pure: one record per
// plate (buildPlateMetadata), turned into ExifTool tags (metadataTags) and
// into the bundle's metadata JSON as it is.
//
// Standards used:
// - XMP Dublin Core and Photoshop, and IPTC Photo Metadata (Creator, Credit
//   Line, Copyright Notice, Web Statement of Rights, Alt Text (Accessibility),
//   Digital Source Type); the vocabulary URI for a composite of captured
//   images is from memory of the IPTC digital source type list.
// - Astronomy Visualization Metadata 1.2 (IVOA note), namespace
//   http://www.communicatingastronomy.org/avm/1.0/ (shared/REFERENCES.md); the
//   Sun is Subject.Category A.3 (REFERENCES.md). The spatial fields follow the
//   FITS conventions AVM adopts: ReferencePixel is CRPIX (1-based, counted
//   from the bottom-left pixel), Scale is CDELT in degrees per pixel with the
//   first negative (east to the left), Rotation is CROTA2, which for such an
//   image is the angle of celestial north counter-clockwise from image up.
// - GPS only when the site's precision is "exact" (the photographer's choice).
import { Body, Equator, EquatorFromVector, GeoVector, MakeTime, Observer } from "astronomy-engine";
import type { LocationPrecision, PlateLicence, Rendition } from "@/db/schema";
import { LICENCE_INFO } from "@/lib/plates/licences";

export const AVM_NAMESPACE = "http://www.communicatingastronomy.org/avm/1.0/";
/** IPTC digital source type for a composite of several captured images (from memory of the IPTC vocabulary). */
export const DIGITAL_SOURCE_COMPOSITE = "http://cv.iptc.org/newscodes/digitalsourcetype/compositeCapture";

/** Sky geometry of the reduction's master, as its report.json gives it (fields absent when unknown). */
export interface MasterSky {
  masterWidth: number;
  masterHeight: number;
  /** 0-based master pixels, x right, y down. */
  sunCentrePx?: { x: number; y: number };
  plateScaleArcsecPerPx?: number;
  /** Celestial north, degrees counter-clockwise from image up. */
  northAngleDeg?: number;
  /** The instant the reduction's geometry refers to (the Moon silhouette's). */
  referenceUtc?: string;
  /** Where the Sun's position is computed from: the site at its public precision, or null (a hidden site) for the Earth's centre. */
  observer?: { latDeg: number; lonDeg: number; elevationM: number } | null;
}

export interface ExportPlateInput {
  slug: string;
  version: number;
  title: string;
  caption: string;
  altText: string;
  acquiredBy: string;
  processedBy: string;
  licence: PlateLicence;
  creditLine: string;
  societyName: string;
  plateUrl: string;
  rendition: Rendition;
  eclipseDate: string;
  captureStartUtc: string | null;
  captureEndUtc: string | null;
  exposuresS: number[];
  kit: { name: string; camera: string; focalMm: number; fNumber: number } | null;
  site: { name: string; precision: LocationPrecision; latDeg: number; lonDeg: number; elevationM: number } | null;
  sky: MasterSky | null;
}

export interface AvmSpatial {
  coordinateFrame: "ICRS";
  equinox: "J2000";
  /** RA and Dec of the Sun's centre, degrees. */
  referenceValue: [number, number];
  referenceDimension: [number, number];
  referencePixel: [number, number];
  /** Degrees per pixel, [-s, s]. */
  scale: [number, number];
  rotation: number;
  projection: "TAN";
  quality: "Full";
}

export interface PlateMetadata {
  title: string;
  caption: string;
  altText: string;
  creators: string[];
  creditLine: string;
  copyright: string;
  licence: { id: PlateLicence; name: string; uri: string };
  source: string;
  digitalSourceType: string;
  dateCreated: string | null;
  avm: {
    metadataVersion: "1.2";
    type: "Observation";
    publisher: string;
    id: string;
    referenceUrl: string;
    subjectCategory: string[];
    subjectName: string[];
    facility: string[];
    instrument: string[];
    spectralColorAssignment: string[];
    spectralBand: string[];
    temporalStartTime: string[];
    temporalIntegrationTime: number[];
    spatial: AvmSpatial | null;
  };
  gps: { latDeg: number; lonDeg: number; elevationM: number } | null;
}

const round = (x: number, digits: number) => Number(x.toFixed(digits));

/** "© 2027 Nadia Fairweather. Licensed under CC BY 4.0." and its variants by licence. */
export function copyrightNotice(owner: string, year: string, licence: PlateLicence): string {
  const info = LICENCE_INFO[licence];
  if (licence === "all-rights-reserved") return `© ${year} ${owner}. All rights reserved.`;
  if (licence === "CC0-1.0") return `Dedicated to the public domain by ${owner} (${info.shortName}).`;
  return `© ${year} ${owner}. Licensed under ${info.shortName}.`;
}

/**
 * The Sun's ICRS (J2000 mean equator) right ascension and declination seen from
 * the site, degrees; from the Earth's centre when the site is hidden (null),
 * which differs by the solar parallax, 8.8 arcsec at most.
 */
export function sunRaDecDeg(utc: string, observer: { latDeg: number; lonDeg: number; elevationM: number } | null): [number, number] {
  const time = MakeTime(new Date(utc));
  const eq = observer ? Equator(Body.Sun, time, new Observer(observer.latDeg, observer.lonDeg, observer.elevationM), false, true) : EquatorFromVector(GeoVector(Body.Sun, time, true));
  return [eq.ra * 15, eq.dec];
}

/**
 * AVM spatial fields for an exported image of width x height made from the
 * master by uniform scaling; null unless the reduction knows the Sun's
 * centre, plate scale, celestial north, instant and observer (its WCS).
 */
export function avmSpatial(sky: MasterSky | null, width: number, height: number): AvmSpatial | null {
  if (!sky?.sunCentrePx || !sky.plateScaleArcsecPerPx || sky.northAngleDeg === undefined || !sky.referenceUtc || sky.observer === undefined) return null;
  const k = width / sky.masterWidth;
  // Pixel centres: master pixel i spans [i, i+1), so its centre maps to (i + 0.5) k - 0.5.
  const x = (sky.sunCentrePx.x + 0.5) * k - 0.5;
  const y = (sky.sunCentrePx.y + 0.5) * k - 0.5;
  const degPerPx = sky.plateScaleArcsecPerPx / k / 3600;
  return {
    coordinateFrame: "ICRS",
    equinox: "J2000",
    referenceValue: sunRaDecDeg(sky.referenceUtc, sky.observer).map((v) => round(v, 6)) as [number, number],
    referenceDimension: [width, height],
    // FITS: 1-based, rows counted from the bottom.
    referencePixel: [round(x + 1, 3), round(height - y, 3)],
    scale: [-round(degPerPx, 10), round(degPerPx, 10)],
    rotation: round(((sky.northAngleDeg % 360) + 360) % 360, 4),
    projection: "TAN",
    quality: "Full",
  };
}

export function buildPlateMetadata(p: ExportPlateInput, width: number, height: number): PlateMetadata {
  const licence = LICENCE_INFO[p.licence];
  const year = (p.captureStartUtc ?? p.eclipseDate).slice(0, 4);
  const colour = p.rendition === "natural" ? ["Red", "Green", "Blue"] : ["Luminance"];
  return {
    title: p.title,
    caption: p.caption,
    altText: p.altText,
    creators: [...new Set([p.acquiredBy, p.processedBy])],
    creditLine: p.creditLine,
    copyright: copyrightNotice(p.acquiredBy, year, p.licence),
    licence: { id: p.licence, name: licence.name, uri: licence.rightsUri },
    source: p.societyName,
    digitalSourceType: DIGITAL_SOURCE_COMPOSITE,
    dateCreated: p.captureStartUtc,
    avm: {
      metadataVersion: "1.2",
      type: "Observation",
      publisher: p.societyName,
      id: `${p.slug}-v${p.version}-${p.rendition}`,
      referenceUrl: p.plateUrl,
      subjectCategory: ["A.3"],
      subjectName: ["Sun", "Solar corona"],
      facility: p.kit ? [p.kit.name] : [],
      instrument: p.kit ? [p.kit.camera] : [],
      spectralColorAssignment: colour,
      spectralBand: ["Optical"],
      temporalStartTime: p.captureStartUtc ? [p.captureStartUtc] : [],
      temporalIntegrationTime: p.exposuresS.length ? [round(p.exposuresS.reduce((a, b) => a + b, 0), 6)] : [],
      spatial: avmSpatial(p.sky, width, height),
    },
    gps: p.site && p.site.precision === "exact" ? { latDeg: p.site.latDeg, lonDeg: p.site.lonDeg, elevationM: p.site.elevationM } : null,
  };
}

export type ExifTagValue = string | number | (string | number)[];

/** ExifTool tag assignments (group-qualified) for one file; resolution in dots per inch when the slot is printed. */
export function metadataTags(m: PlateMetadata, dpi: number | null): Record<string, ExifTagValue> {
  const tags: Record<string, ExifTagValue> = {
    "XMP-dc:Title": m.title,
    "XMP-dc:Description": m.caption || m.title,
    "XMP-dc:Creator": m.creators,
    "XMP-dc:Rights": m.copyright,
    "XMP-dc:Source": m.source,
    "XMP-photoshop:Credit": m.creditLine,
    "XMP-xmpRights:WebStatement": m.licence.uri,
    "XMP-xmpRights:UsageTerms": m.licence.name,
    "XMP-xmpRights:Marked": m.licence.id === "CC0-1.0" ? "False" : "True",
    "XMP-iptcCore:AltTextAccessibility": m.altText,
    "XMP-iptcExt:DigitalSourceType": m.digitalSourceType,
    "XMP-avm:MetadataVersion": m.avm.metadataVersion,
    "XMP-avm:Type": m.avm.type,
    "XMP-avm:Publisher": m.avm.publisher,
    "XMP-avm:ID": m.avm.id,
    "XMP-avm:ReferenceURL": m.avm.referenceUrl,
    "XMP-avm:SubjectCategory": m.avm.subjectCategory,
    "XMP-avm:SubjectName": m.avm.subjectName,
    "XMP-avm:SpectralColorAssignment": m.avm.spectralColorAssignment,
    "XMP-avm:SpectralBand": m.avm.spectralBand,
  };
  if (m.dateCreated) tags["XMP-photoshop:DateCreated"] = m.dateCreated;
  if (m.avm.facility.length) tags["XMP-avm:Facility"] = m.avm.facility;
  if (m.avm.instrument.length) tags["XMP-avm:Instrument"] = m.avm.instrument;
  if (m.avm.temporalStartTime.length) tags["XMP-avm:TemporalStartTime"] = m.avm.temporalStartTime;
  if (m.avm.temporalIntegrationTime.length) tags["XMP-avm:TemporalIntegrationTime"] = m.avm.temporalIntegrationTime;
  const s = m.avm.spatial;
  if (s) {
    Object.assign(tags, {
      "XMP-avm:SpatialCoordinateFrame": s.coordinateFrame,
      "XMP-avm:SpatialEquinox": s.equinox,
      "XMP-avm:SpatialReferenceValue": s.referenceValue,
      "XMP-avm:SpatialReferenceDimension": s.referenceDimension,
      "XMP-avm:SpatialReferencePixel": s.referencePixel,
      "XMP-avm:SpatialScale": s.scale,
      "XMP-avm:SpatialRotation": s.rotation,
      "XMP-avm:SpatialCoordsystemProjection": s.projection,
      "XMP-avm:SpatialQuality": s.quality,
    });
  }
  if (m.gps) {
    Object.assign(tags, {
      "GPS:GPSLatitude": Math.abs(m.gps.latDeg),
      "GPS:GPSLatitudeRef": m.gps.latDeg >= 0 ? "N" : "S",
      "GPS:GPSLongitude": Math.abs(m.gps.lonDeg),
      "GPS:GPSLongitudeRef": m.gps.lonDeg >= 0 ? "E" : "W",
      "GPS:GPSAltitude": Math.abs(m.gps.elevationM),
      "GPS:GPSAltitudeRef": m.gps.elevationM >= 0 ? "Above Sea Level" : "Below Sea Level",
    });
  }
  if (dpi) Object.assign(tags, { XResolution: dpi, YResolution: dpi, ResolutionUnit: "inches" });
  return tags;
}

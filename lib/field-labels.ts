// The words people read for our input fields. Code keys (exposureS, altText)
// stay in the code and the JSON; messages name a field by its label here.

/** Labels for the keys whose words cannot be read off the key itself. */
const LABELS: Record<string, string> = {
  acquiredBy: "data acquisition credit",
  altText: "alt text",
  captionOverride: "caption for this edition",
  captureTimeUtc: "capture time (UTC)",
  clockOffsetS: "camera clock offset",
  clockShownAt: "time the camera showed",
  creditLineTemplate: "credit line pattern",
  customDpi: "resolution (dpi)",
  customWidthMm: "width (mm)",
  defaultCreditLine: "default credit line",
  defaultLicence: "default licence",
  eclipseId: "eclipse",
  elevationM: "elevation (m)",
  email: "e-mail",
  embargoDate: "embargo date",
  exposureS: "exposure time",
  fNumber: "f-number",
  fileNameTemplate: "file name pattern",
  filterStrength: "filter strength",
  focalMm: "focal length (mm)",
  groupNumber: "group",
  issueLabel: "issue label",
  kitId: "kit",
  latDeg: "latitude",
  lonDeg: "longitude",
  messageToPhotographer: "message to the photographer",
  outputLongSidePx: "output size",
  pixelPitchUm: "pixel pitch (µm)",
  processedBy: "processing credit",
  reasonCode: "reason",
  recoverResponse: "camera response recovery",
  reductionId: "reduction",
  reductionIds: "reductions to compose",
  refine: "position refinement",
  renditions: "renditions",
  scaleArcsecPerPx: "plate scale (arcsec per pixel)",
  sensorHeightMm: "sensor height (mm)",
  sensorWidthMm: "sensor width (mm)",
  shortName: "short name",
  siteId: "site",
  slug: "link name",
  timeZone: "time zone",
  trackText: "track",
  trackFileName: "track file",
  userId: "person",
};

/** Unit suffixes of our keys, read out (see STYLE: units in names). */
const UNITS: [RegExp, string][] = [
  [/Utc$/, " (UTC)"],
  [/Deg$/, " (degrees)"],
  [/Mm$/, " (mm)"],
  [/Um$/, " (µm)"],
  [/Px$/, " (pixels)"],
  [/Ms$/, " (ms)"],
  [/S$/, " (seconds)"],
  [/M$/, " (m)"],
  [/Id$/, ""],
];

/** "customWidthMm" -> "custom width (mm)"; a path "frames.2.exposureS" -> "exposure time of item 3". */
export function fieldLabel(path: string): string {
  const parts = path.split(".").filter(Boolean);
  if (parts.length === 0 || path === "(input)") return "the request";
  const last = parts[parts.length - 1];
  const index = parts.findLast((p) => /^\d+$/.test(p));
  const base = /^\d+$/.test(last) ? `item ${Number(last) + 1}` : labelOfKey(last);
  return index !== undefined && index !== last ? `${base} of item ${Number(index) + 1}` : base;
}

function labelOfKey(key: string): string {
  if (LABELS[key]) return LABELS[key];
  let unit = "";
  let stem = key;
  for (const [re, words] of UNITS) {
    if (re.test(stem) && stem.replace(re, "").length > 0) {
      unit = words;
      stem = stem.replace(re, "");
      break;
    }
  }
  return `${stem.replace(/([a-z0-9])([A-Z])/g, "$1 $2").toLowerCase()}${unit}`;
}

/** "exposure time" -> "Exposure time". */
export const capitalize = (s: string) => (s ? s[0].toUpperCase() + s.slice(1) : s);

// Server-rendered parts of the reduction page: parameters, measurements, the
// stage log, the renditions and the downloads.
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import { buildOutputUrl } from "@/lib/reductions/files/manifest";
import { describeTiming, FILTER_LABELS, MOON_SOURCES, OUTPUT_SIZE_LABEL, REGISTRATION_SHORT } from "./labels";
import { formatDateTime } from "@/lib/format/dates";

function DefinitionList({ rows }: { rows: [string, string][] }) {
  return (
    <dl className="grid grid-cols-1 gap-x-6 gap-y-2 sm:grid-cols-[max-content_1fr]">
      {rows.map(([k, v]) => (
        <div key={k} className="contents">
          <dt className="text-ink-muted">{k}</dt>
          <dd className="font-mono break-words">{v}</dd>
        </div>
      ))}
    </dl>
  );
}

/** The parameters as stored; reductions started before a parameter existed lack it. */
export interface ShownParams {
  registration?: string;
  filter?: string;
  filterStrength?: number;
  outputLongSidePx?: number;
  recoverResponse?: boolean;
  groupNumber?: number | null;
}

export function ReductionParameters({ params }: { params: ShownParams }) {
  return (
    <DefinitionList
      rows={[
        ["Frames aligned on", REGISTRATION_SHORT[params.registration ?? ""] ?? params.registration ?? "—"],
        ["Structure filter", FILTER_LABELS[params.filter ?? ""] ?? params.filter ?? "—"],
        ["Structure strength", params.filterStrength !== undefined ? String(params.filterStrength) : "0.3 (the default then)"],
        ["Size of renditions", OUTPUT_SIZE_LABEL(params.outputLongSidePx ?? 0)],
        ["Camera response", params.recoverResponse ? "Recovered from the bracket" : "Assumed (linear data, or sRGB for 8-bit frames)"],
        ["Frames", params.groupNumber ? `Group ${params.groupNumber}` : "Every included light frame"],
      ]}
    />
  );
}

function num(v: unknown): number | null {
  return typeof v === "number" && Number.isFinite(v) ? v : null;
}

/** Measurements from the reduction's stored overall section (report.json's), with the report's own as a fallback. */
export function ReductionMeasurements({ measurements, pipelineVersion }: { measurements: Record<string, unknown>; pipelineVersion: string | null }) {
  const sky = (measurements.sky ?? {}) as Record<string, unknown>;
  const stops = num(measurements.dynamicRangeStops);
  const moon = typeof measurements.moonSource === "string" ? measurements.moonSource : null;
  const rows: [string, string][] = [
    ["Dynamic range", stops !== null ? `${stops.toFixed(1)} stops` : "not measured"],
    ["Moon placed from", moon ? (MOON_SOURCES[moon] ?? moon) : "not recorded"],
    ["Reference frame", typeof measurements.referenceFrame === "string" ? measurements.referenceFrame : "—"],
    ["Pipeline version", pipelineVersion ?? "—"],
  ];
  const scale = num(sky.plateScaleArcsecPerPx);
  if (scale !== null) rows.push(["Plate scale", `${scale.toFixed(3)} arcsec per pixel`]);
  const sunR = num(sky.sunRadiusPx);
  if (sunR !== null) rows.push(["Solar radius", `${sunR.toFixed(1)} px`]);
  const p = num(sky.pAngleDeg);
  if (p !== null) rows.push(["Position angle of the Sun's axis (P)", `${p.toFixed(2)}°`]);
  const north = num(sky.northAngleDeg);
  if (north !== null) rows.push(["Celestial north in the image", `${north.toFixed(2)}° counter-clockwise from up`]);
  if (typeof sky.moonSilhouetteUtc === "string") rows.push(["Moon silhouette shows", formatDateTime(sky.moonSilhouetteUtc, { seconds: true })]);
  return <DefinitionList rows={rows} />;
}

/** Time per stage, with a bar for its share of the total (the number beside it says the same). Stages that overlap (files and tiles are written together) can add up to more than the total. */
export function StageLog({ timingsMs }: { timingsMs: Record<string, number> }) {
  const entries = Object.entries(timingsMs);
  const total = timingsMs.total;
  return (
    <Table caption="Stage log: time taken by each stage">
      <TableHead>
        <TableRow>
          <TableHeader>Stage</TableHeader>
          <TableHeader>Time</TableHeader>
          <TableHeader>Share of the total</TableHeader>
        </TableRow>
      </TableHead>
      <TableBody>
        {entries.map(([stage, ms]) => (
          <TableRow key={stage}>
            <TableCell>{describeTiming(stage)}</TableCell>
            <TableCell className="font-mono">{(ms / 1000).toFixed(2)} s</TableCell>
            <TableCell>
              {total && stage !== "total" ? (
                <span className="flex items-center gap-2">
                  <span aria-hidden="true" className="block h-2 rounded-full bg-accent" style={{ width: `${Math.max(1, Math.round((Math.min(ms, total) / total) * 160))}px` }} />
                  <span className="font-mono">{Math.round((ms / total) * 100)}%</span>
                </span>
              ) : null}
            </TableCell>
          </TableRow>
        ))}
      </TableBody>
    </Table>
  );
}

export function Renditions({ reductionId, setName, structurePreview }: { reductionId: string; setName: string; structurePreview: string }) {
  const items = [
    { key: "natural", title: "Natural", text: "Tone-mapped light, close to what the eye saw.", src: buildOutputUrl(reductionId, "preview.jpg"), full: "natural.png" },
    { key: "structure", title: "Structure", text: "Radially filtered to show the corona's structure.", src: buildOutputUrl(reductionId, structurePreview), full: "structure.png" },
  ];
  return (
    <div className="grid grid-cols-1 gap-6 lg:grid-cols-2">
      {items.map((r) => (
        <figure key={r.key} className="flex flex-col gap-2">
          <a href={buildOutputUrl(reductionId, r.full)} className="block overflow-hidden rounded-card border border-line bg-black">
            {/* eslint-disable-next-line @next/next/no-img-element -- outputs served by our own route, already sized */}
            <img src={r.src} alt={`${r.title} rendition of the corona from ${setName}`} className="h-auto w-full" />
            <span className="sr-only">Open the full-size {r.title.toLowerCase()} rendition</span>
          </a>
          <figcaption>
            <span className="font-semibold">{r.title}.</span> <span className="text-ink-muted">{r.text}</span>
          </figcaption>
        </figure>
      ))}
    </div>
  );
}

export function ReductionDownloads({ reductionId }: { reductionId: string }) {
  const files = [
    ["master.fits", "Master FITS", "linear, 32-bit float, one plane per colour, with its WCS when the site was known"],
    ["natural.png", "Natural rendition", "16-bit PNG"],
    ["structure.png", "Structure rendition", "16-bit PNG"],
    ["report.json", "Report", "per-frame limb fits, transforms, weights, profile, coverage and timings (JSON)"],
  ];
  return (
    <ul className="flex flex-col gap-2">
      {files.map(([path, title, text]) => (
        <li key={path}>
          <a href={buildOutputUrl(reductionId, path, { download: true })} download className="font-medium">
            {title}
          </a>{" "}
          <span className="text-ink-muted">
            ({path}: {text})
          </span>
        </li>
      ))}
    </ul>
  );
}

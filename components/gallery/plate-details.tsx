import Link from "next/link";
import type { ReactNode } from "react";
import type { PublicPlateDto } from "@/lib/plates/public";
import { formatExposure } from "@/components/bracket-sets/exposure-text";
import { describeTiming } from "@/components/reductions/labels";
import { CompositeInputs } from "./composite-inputs";
import { PlateDownloads } from "./plate-downloads";
import { formatDate, formatDateTime } from "@/lib/format/dates";

/** The pipeline's stages in the order they run; "reduce" and "total" are sums of others. */
const STAGE_ORDER = ["decode", "sky-geometry", "linearize-and-limb", "register", "response", "warp-and-merge", "renditions", "write-master", "write-renditions", "tiles", "summary"];

function Row({ term, children }: { term: string; children: ReactNode }) {
  return (
    <>
      <dt className="text-ink-muted">{term}</dt>
      <dd>{children}</dd>
    </>
  );
}

function utcTime(iso: string): string {
  return formatDateTime(iso, { seconds: true });
}

/** What a visitor must know to read the image: what, where, when, with what, by whom, how, and under which licence. */
export function PlateDetails({ plate, society, credit }: { plate: PublicPlateDto; society: string; credit: string }) {
  const pos = plate.site.position;
  return (
    <div className="flex flex-col gap-8">
      {plate.description ? <div className="max-w-prose whitespace-pre-line text-ink">{plate.description}</div> : null}

      <section aria-labelledby="credits-h">
        <h2 id="credits-h" className="mb-3 text-lg font-semibold">
          Credits and licence
        </h2>
        <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-2 text-sm">
          <Row term="Data acquired by">{plate.acquiredBy}</Row>
          <Row term="Processed by">{plate.processedBy}</Row>
          {plate.composite?.composedBy ? <Row term="Composite made by">{plate.composite.composedBy}</Row> : null}
          <Row term="Published by">{society}</Row>
          <Row term="Credit line">{credit}</Row>
          <Row term="Licence">
            <a href={plate.licence.deedUrl} rel="license">
              {plate.licence.name}
            </a>
          </Row>
        </dl>
      </section>

      <section aria-labelledby="observation-h">
        <h2 id="observation-h" className="mb-3 text-lg font-semibold">
          The observation
        </h2>
        <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-2 text-sm">
          <Row term="Eclipse">
            <Link href={`/eclipses/${plate.eclipseId}`}>Total solar eclipse of {plate.eclipseId}</Link>
          </Row>
          <Row term={plate.composite ? "Sites" : "Site"}>
            {plate.composite ? (
              <span>{plate.composite.inputs.length} inputs, each with its site below{plate.siteCountry ? `, all in ${plate.siteCountry}` : ""}.</span>
            ) : pos ? (
              <>
                {plate.site.label}
                {plate.site.kind === "moving" ? `${plate.site.label ? " " : ""}(moving: ship or aircraft)` : ""}
                <span className="block font-mono text-ink-muted">
                  {pos.latDeg.toFixed(pos.precision === "exact" ? 4 : 1)}°, {pos.lonDeg.toFixed(pos.precision === "exact" ? 4 : 1)}°{pos.precision === "rounded" ? " (rounded to about 10 km)" : ""}
                </span>
                {plate.siteCountry ? <span className="block text-ink-muted">{plate.siteCountry}</span> : null}
              </>
            ) : (
              <span className="text-ink-muted">The observer keeps the site private.</span>
            )}
          </Row>
          {plate.captureSpan ? (
            <Row term="Time">
              {utcTime(plate.captureSpan.start)} to {plate.captureSpan.end.slice(11, 19)} UTC
            </Row>
          ) : null}
          {plate.kit ? (
            <Row term="Instrument">
              {plate.kit.camera}, {plate.kit.focalMm} mm at f/{plate.kit.fNumber} ({plate.kit.name})
            </Row>
          ) : null}
          {plate.exposuresS.length ? <Row term="Exposures">{plate.exposuresS.map((e) => formatExposure(e)).join(", ")}</Row> : null}
        </dl>
      </section>

      <section aria-labelledby="processing-h">
        <h2 id="processing-h" className="mb-3 text-lg font-semibold">
          How this image was made
        </h2>
        {plate.composite ? (
          <p className="mb-3 max-w-prose text-sm text-ink-muted">
            Each input below is a bracket reduced on its own (its frames aligned and merged across their exposures into one image of the light). The inputs were then placed on one
            grid centred on the Sun with solar north up, at the finest input&apos;s plate scale{plate.composite.scaleArcsecPerPx ? ` (${plate.composite.scaleArcsecPerPx.toFixed(2)} arcsec per pixel)` : ""}, from each
            one&apos;s sky coordinates refined by matching the corona itself. Each input&apos;s brightness was scaled to the first&apos;s where they overlap, and the light merged with
            weights that fade smoothly towards each input&apos;s field edge and its own Moon, and where a finer input covers. The structure rendition applies a radial filter (
            {plate.disclosure.filter === "nrgf" ? "normalizing radial graded filter" : "multi-scale Gaussian normalization"}). The viewer&apos;s map layer shows which input gives the light where. Nothing was
            painted or cloned.
          </p>
        ) : (
        <p className="mb-3 max-w-prose text-sm text-ink-muted">
          The frames of one bracket were aligned {plate.disclosure.registration === "sun" ? "on the Sun's centre (from the site, the time and the ephemeris)" : plate.disclosure.registration === "moon" ? "on the Moon's limb" : "on the corona"}, merged across their
          exposures into one image of the light, and shown two ways: the natural rendition compresses the brightness range; the structure rendition applies a radial filter (
          {plate.disclosure.filter === "nrgf" ? "normalizing radial graded filter" : "multi-scale Gaussian normalization"}, strength {plate.disclosure.filterStrength}) that brings out structure far from the
          limb. Nothing was painted or cloned.
        </p>
        )}
        {plate.composite ? <CompositeInputs composite={plate.composite} /> : null}
        <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-2 text-sm">
          {plate.disclosure.pipelineVersion ? <Row term="Pipeline">{plate.disclosure.pipelineVersion}</Row> : null}
          {plate.disclosure.referenceFrame ? <Row term="Reference frame">{plate.disclosure.referenceFrame}</Row> : null}
          {plate.disclosure.moonSilhouetteUtc ? <Row term="Moon silhouette as at">{utcTime(plate.disclosure.moonSilhouetteUtc)}</Row> : null}
          {plate.disclosure.dynamicRangeStops !== null ? <Row term="Brightness range recorded">{plate.disclosure.dynamicRangeStops.toFixed(1)} stops</Row> : null}
          {plate.disclosure.stages.some((s) => STAGE_ORDER.includes(s.name)) ? (
            <Row term="Stages">
              <ol className="list-decimal pl-5">
                {plate.disclosure.stages
                  .filter((s) => STAGE_ORDER.includes(s.name))
                  .sort((a, b) => STAGE_ORDER.indexOf(a.name) - STAGE_ORDER.indexOf(b.name))
                  .map((s) => (
                    <li key={s.name}>{describeTiming(s.name)}</li>
                  ))}
              </ol>
            </Row>
          ) : null}
        </dl>
      </section>

      {plate.downloads.length ? (
        <section aria-labelledby="downloads-h">
          <h2 id="downloads-h" className="mb-3 text-lg font-semibold">
            Downloads
          </h2>
          <p className="mb-3 max-w-prose text-sm">
            Licensed under{" "}
            <a href={plate.licence.deedUrl} className="underline">
              {plate.licence.shortName}
            </a>
            . Credit: {plate.acquiredBy} (data), {plate.processedBy} (processing), {society}.
            {plate.licence.allowsDownload ? "" : " Full-resolution files are not offered under this licence."}
          </p>
          <PlateDownloads plate={plate} />
        </section>
      ) : null}

      <section aria-labelledby="versions-h">
        <h2 id="versions-h" className="mb-3 text-lg font-semibold">
          Versions and links
        </h2>
        <ul className="flex flex-col gap-1 text-sm">
          {plate.versions.map((v) => (
            <li key={v.version}>
              <Link href={v.url} aria-current={v.version === plate.version ? "page" : undefined} className="underline">
                Version {v.version}
              </Link>{" "}
              <span className="text-ink-muted">
                {formatDate(v.createdAt)}
                {v.changeNote ? `: ${v.changeNote}` : ""}
              </span>
            </li>
          ))}
          {plate.withdrawn ? null : (
            <li>
              <a href={`/iiif/plates/${plate.slug}${plate.isCurrentVersion ? "" : `/v/${plate.version}`}/manifest.json`} className="underline">
                IIIF manifest
              </a>{" "}
              <span className="text-ink-muted">(to show this plate in other IIIF viewers)</span>
            </li>
          )}
        </ul>
      </section>
    </div>
  );
}

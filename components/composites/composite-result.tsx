"use client";
import { PlateViewer } from "@/components/viewer/plate-viewer";
import { PageSection } from "@/components/ui/page-section";
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import type { CompositeDto } from "@/lib/composites/composites";
import { buildCompositeOutputUrl } from "@/lib/reductions/files/manifest";

interface InputFigures {
  colour: string;
  isReference: boolean;
  scaleArcsecPerPx: number;
  fieldR: { inner: number; outer: number };
  factors: number[];
  factorSpreads: number[];
  refinement: { lonArcsec: number; latArcsec: number; peak: number; applied: boolean; note?: string };
  weightShare: number;
}

interface ReportFigures {
  grid?: { width: number; height: number; scaleArcsecPerPx: number; sunCentre: { x: number; y: number }; sunRadiusPx: number };
  inputs?: InputFigures[];
  notes?: string[];
  timingsMs?: Record<string, number>;
}

const RENDITIONS = [
  { key: "natural", title: "Natural", text: "tone-mapped light, close to what the eye saw" },
  { key: "structure", title: "Structure", text: "radially filtered to show the corona's structure" },
] as const;

/** A finished composite: both renditions in the zooming viewer with the contribution map over them on request, each input's figures, and the files. */
export function CompositeResult({ composite }: { composite: CompositeDto }) {
  const report = (composite.measurements ?? {}) as ReportFigures;
  const inputs = report.inputs ?? [];
  const url = (path: string, download = false) => buildCompositeOutputUrl(composite.id, path, { download });
  const legend = inputs.map((figures, k) => ({ ...figures, name: composite.inputs[k]?.setName ?? `Input ${k + 1}` }));
  return (
    <>
      <PageSection id="renditions" title="Renditions">
        {report.grid ? (
          <PlateViewer
            title={composite.title}
            altText={`The corona composed from ${legend.map((i) => i.name).join(" and ")}, solar north up.`}
            renditions={RENDITIONS.map((r) => ({ key: r.key, label: r.title, tileSource: url(`tiles/${r.key}.dzi`), width: report.grid!.width, height: report.grid!.height }))}
            geometry={{
              sunCentre: report.grid.sunCentre,
              sunRadiusPx: report.grid.sunRadiusPx,
              solarNorthAngleDeg: 0,
              plateScaleArcsecPerPx: report.grid.scaleArcsecPerPx,
            }}
            mapLayer={{ label: "Show where each input contributes", url: url("contribution.jpg"), legend: legend.map((i) => ({ label: `${i.name}: ${(100 * i.weightShare).toFixed(1)} % of the light`, colour: i.colour })) }}
          />
        ) : null}
        <ul className="mt-4 flex flex-wrap gap-x-6 gap-y-2 text-sm">
          {RENDITIONS.map((r) => (
            <li key={r.key}>
              <a href={url(`${r.key}.png`)}>Full-size {r.title.toLowerCase()} rendition</a> <span className="text-ink-muted">({r.text})</span>
            </li>
          ))}
        </ul>
      </PageSection>
      <PageSection id="inputs" title="Inputs">
        <Table caption="How each input went into the composite">
          <TableHead>
            <TableRow>
              <TableHeader>Input</TableHeader>
              <TableHeader>Plate scale</TableHeader>
              <TableHeader>Field</TableHeader>
              <TableHeader>Brightness factor</TableHeader>
              <TableHeader>Position correction</TableHeader>
              <TableHeader>Share of the light</TableHeader>
            </TableRow>
          </TableHead>
          <TableBody>
            {legend.map((input) => (
              <TableRow key={input.name}>
                <TableCell>
                  <span className="inline-flex items-center gap-2">
                    <span aria-hidden="true" className="inline-block size-3 rounded-sm border border-line" style={{ backgroundColor: input.colour }} />
                    {input.name}
                    {input.isReference ? <span className="text-ink-muted">(reference)</span> : null}
                  </span>
                </TableCell>
                <TableCell>{input.scaleArcsecPerPx.toFixed(2)} arcsec/px</TableCell>
                <TableCell>
                  {input.fieldR.inner.toFixed(1)} to {input.fieldR.outer.toFixed(1)} solar radii
                </TableCell>
                <TableCell>{input.isReference ? "1 (reference)" : input.factors.map((f) => f.toFixed(3)).join(" / ")}</TableCell>
                <TableCell>
                  {input.isReference
                    ? "none (reference)"
                    : input.refinement.applied
                      ? `${Math.hypot(input.refinement.lonArcsec, input.refinement.latArcsec).toFixed(1)} arcsec`
                      : input.refinement.note ?? "not refined"}
                </TableCell>
                <TableCell>{(100 * input.weightShare).toFixed(1)} %</TableCell>
              </TableRow>
            ))}
          </TableBody>
        </Table>
        {report.grid ? (
          <p className="mt-3 text-sm text-ink-muted">
            The composite is {report.grid.width} × {report.grid.height} px at {report.grid.scaleArcsecPerPx.toFixed(2)} arcsec per pixel, solar north up.
          </p>
        ) : null}
        {(report.notes ?? []).length ? (
          <ul className="mt-3 list-disc pl-6 text-sm">
            {report.notes!.map((n) => (
              <li key={n}>{n}</li>
            ))}
          </ul>
        ) : null}
      </PageSection>
      <PageSection id="files" title="Files">
        <ul className="flex flex-col gap-2">
          {[
            ["master.fits", "Master FITS", "linear, 32-bit float, with its helioprojective WCS and each input's provenance"],
            ["natural.png", "Natural rendition", "16-bit PNG"],
            ["structure.png", "Structure rendition", "16-bit PNG"],
            ["contribution.jpg", "Contribution map", "each input's share of the light, in its colour"],
            ["report.json", "Report", "inputs, factors, corrections, shares and timings (JSON)"],
          ].map(([path, title, text]) => (
            <li key={path}>
              <a href={url(path, true)} download className="font-medium">
                {title}
              </a>{" "}
              <span className="text-ink-muted">
                ({path}: {text})
              </span>
            </li>
          ))}
        </ul>
      </PageSection>
    </>
  );
}

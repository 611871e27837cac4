"use client";
import { useState } from "react";
import { Checkbox } from "@/components/ui/checkbox";
import { PageSection } from "@/components/ui/page-section";
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import type { CompositeDto } from "@/lib/composites/composites";
import { buildCompositeOutputUrl } from "@/lib/composites/output-paths";

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
  grid?: { width: number; height: number; scaleArcsecPerPx: number };
  inputs?: InputFigures[];
  notes?: string[];
  timingsMs?: Record<string, number>;
}

const RENDITIONS = [
  { key: "natural", title: "Natural", text: "Tone-mapped light, close to what the eye saw.", preview: "preview.jpg" },
  { key: "structure", title: "Structure", text: "Radially filtered to show the corona's structure.", preview: "preview-structure.jpg" },
] as const;

/** A finished composite: both renditions with the contribution map over them on request, each input's figures, and the files. */
export function CompositeResult({ composite }: { composite: CompositeDto }) {
  const [showMap, setShowMap] = useState(false);
  const report = (composite.measurements ?? {}) as ReportFigures;
  const inputs = report.inputs ?? [];
  const url = (path: string, download = false) => buildCompositeOutputUrl(composite.id, path, { download });
  const legend = inputs.map((figures, k) => ({ ...figures, name: composite.inputs[k]?.setName ?? `Input ${k + 1}` }));
  return (
    <>
      <PageSection id="renditions" title="Renditions">
        <Checkbox
          checked={showMap}
          onChange={(e) => setShowMap(e.currentTarget.checked)}
          label="Show where each input contributes"
          hint="Each input's colour, mixed where two share the light; see the list below."
          className="mb-4"
        />
        <div className="grid grid-cols-1 gap-6 lg:grid-cols-2">
          {RENDITIONS.map((r) => (
            <figure key={r.key} className="flex flex-col gap-2">
              <a href={url(`${r.key}.png`)} className="relative block overflow-hidden rounded-card border border-line bg-black">
                {/* eslint-disable-next-line @next/next/no-img-element -- outputs served by our own route, already sized */}
                <img src={url(r.preview)} alt={`${r.title} rendition of the composite ${composite.title}`} className="h-auto w-full" />
                {showMap ? (
                  // eslint-disable-next-line @next/next/no-img-element -- the same size as the preview under it
                  <img src={url("contribution.jpg")} alt="" aria-hidden="true" className="absolute inset-0 h-full w-full opacity-60 mix-blend-screen" />
                ) : null}
                <span className="sr-only">Open the full-size {r.title.toLowerCase()} rendition</span>
              </a>
              <figcaption>
                <span className="font-semibold">{r.title}.</span> <span className="text-ink-muted">{r.text}</span>
              </figcaption>
            </figure>
          ))}
        </div>
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

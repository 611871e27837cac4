import type { PublicCompositeDto } from "@/lib/plates/public";
import { formatExposure } from "@/components/bracket-sets/exposure-text";
import { formatDateTime } from "@/lib/format/dates";
import { describeInput } from "./plate-image";

/** A composite plate's inputs, one card each: who, with what, where, when, and what the composite took from it. */
export function CompositeInputs({ composite }: { composite: PublicCompositeDto }) {
  return (
    <section aria-labelledby="inputs-h" className="mb-4">
      <h3 id="inputs-h" className="mb-2 text-base font-semibold">
        The {composite.inputs.length} inputs
      </h3>
      <ol className="grid gap-3 md:grid-cols-2">
        {composite.inputs.map((input, k) => {
          const pos = input.site.position;
          return (
            <li key={k} className="min-w-0 rounded-card border border-line p-4 text-sm">
              <p className="mb-2 flex items-center gap-2 font-medium">
                <span aria-hidden="true" className="inline-block h-3 w-3 shrink-0 rounded-full border border-line" style={{ backgroundColor: input.colour ?? "transparent" }} />
                {k + 1}. {describeInput(input)}
                {input.isReference ? <span className="font-normal text-ink-muted">(brightness reference)</span> : null}
              </p>
              <dl className="grid grid-cols-[max-content_minmax(0,1fr)] gap-x-4 gap-y-1">
                <dt className="text-ink-muted">Data</dt>
                <dd>{input.photographer}</dd>
                {input.kit ? (
                  <>
                    <dt className="text-ink-muted">Instrument</dt>
                    <dd>
                      {input.kit.camera}, {input.kit.focalMm} mm at f/{input.kit.fNumber}
                    </dd>
                  </>
                ) : null}
                <dt className="text-ink-muted">Site</dt>
                <dd>
                  {pos ? (
                    <>
                      {input.site.label ? `${input.site.label}, ` : ""}
                      <span className="font-mono">
                        {pos.latDeg.toFixed(pos.precision === "exact" ? 4 : 1)}°, {pos.lonDeg.toFixed(pos.precision === "exact" ? 4 : 1)}°
                      </span>
                      {pos.precision === "rounded" ? " (rounded to about 10 km)" : ""}
                    </>
                  ) : (
                    "kept private by the observer"
                  )}
                  {input.site.kind === "moving" ? " (moving: ship or aircraft)" : ""}
                </dd>
                {input.captureSpan ? (
                  <>
                    <dt className="text-ink-muted">Time</dt>
                    <dd>
                      {formatDateTime(input.captureSpan.start, { seconds: true })} to {input.captureSpan.end.slice(11, 19)} UTC
                    </dd>
                  </>
                ) : null}
                {input.exposuresS.length ? (
                  <>
                    <dt className="text-ink-muted">Exposures</dt>
                    <dd>{input.exposuresS.map((e) => formatExposure(e)).join(", ")}</dd>
                  </>
                ) : null}
                {input.plateScaleArcsecPerPx !== null ? (
                  <>
                    <dt className="text-ink-muted">Plate scale</dt>
                    <dd>{input.plateScaleArcsecPerPx.toFixed(2)} arcsec per pixel</dd>
                  </>
                ) : null}
                {input.fieldR ? (
                  <>
                    <dt className="text-ink-muted">Reaches</dt>
                    <dd>
                      {input.fieldR.inner.toFixed(1)} to {input.fieldR.outer.toFixed(1)} solar radii from the Sun&apos;s centre
                    </dd>
                  </>
                ) : null}
                {input.factors.length && !input.isReference ? (
                  <>
                    <dt className="text-ink-muted">Brightness scaled by</dt>
                    <dd>{input.factors.map((f) => f.toPrecision(3)).join(", ")}{input.factors.length > 1 ? " (per colour)" : ""}</dd>
                  </>
                ) : null}
                {input.refinementArcsec !== null ? (
                  <>
                    <dt className="text-ink-muted">Placement corrected by</dt>
                    <dd>{input.refinementArcsec.toFixed(1)} arcsec</dd>
                  </>
                ) : null}
                {input.weightShare !== null ? (
                  <>
                    <dt className="text-ink-muted">Share of the light</dt>
                    <dd>{(100 * input.weightShare).toFixed(1)} %</dd>
                  </>
                ) : null}
                {input.pipelineVersion ? (
                  <>
                    <dt className="text-ink-muted">Reduced with</dt>
                    <dd>{input.pipelineVersion}</dd>
                  </>
                ) : null}
              </dl>
            </li>
          );
        })}
      </ol>
    </section>
  );
}

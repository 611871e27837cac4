import type { ReportFrame } from "@/lib/reductions/report-schema";

function formatExposure(s: number | null | undefined): string {
  if (s == null) return "exposure unknown";
  return s >= 1 ? `${s.toPrecision(3)} s` : `1/${Math.round(1 / s)} s`;
}

// lib/imaging/limb-fit.ts LimbVerdict.
const VERDICTS: Record<string, string> = { sound: "sound fit", doubtful: "doubtful fit", failed: "no fit" };

/**
 * Each frame's thumbnail with the lunar limb the reduction fitted, drawn as a
 * circle in the frame's own pixel grid (the SVG's viewBox is the decoded frame,
 * laid exactly over the thumbnail, so the circle scales with it).
 */
export function FrameLimbs({ setId, frames, frameIds, referenceFrame }: { setId: string; frames: ReportFrame[]; frameIds: Record<string, string>; referenceFrame: string | null }) {
  if (frames.length === 0) return <p className="text-ink-muted">The report lists no frames.</p>;
  return (
    <ul className="grid grid-cols-2 gap-4 sm:grid-cols-3 lg:grid-cols-4" aria-label="Frames and their fitted limbs">
      {frames.map((f) => {
        const id = frameIds[f.name];
        const w = f.decoded?.width ?? 0;
        const h = f.decoded?.height ?? 0;
        const limb = f.limb;
        const hasCircle = w > 0 && h > 0 && limb?.x != null && limb.y != null && limb.radiusPx != null && limb.verdict !== "failed";
        const verdict = VERDICTS[limb?.verdict ?? ""] ?? limb?.verdict ?? "no fit";
        const alt = `${f.name}, ${formatExposure(f.exposure?.seconds)}${hasCircle ? `, with the fitted lunar limb drawn as a circle of radius ${limb!.radiusPx!.toFixed(1)} px` : ""}`;
        return (
          <li key={f.name}>
            <figure className="flex flex-col gap-2">
              <div className="relative w-full overflow-hidden rounded-control border border-line bg-black" style={{ aspectRatio: w > 0 && h > 0 ? `${w} / ${h}` : "4 / 3" }}>
                {id ? (
                  // eslint-disable-next-line @next/next/no-img-element -- a thumbnail served by our own route; next/image would re-encode it
                  <img src={`/api/bracket-sets/${setId}/frames/${id}/thumbnail`} alt={alt} loading="lazy" className="absolute inset-0 size-full object-contain" />
                ) : (
                  <p className="absolute inset-0 flex items-center justify-center p-2 text-center text-sm text-white">No thumbnail: the frame is no longer in the set.</p>
                )}
                {hasCircle ? (
                  <svg viewBox={`0 0 ${w} ${h}`} aria-hidden="true" className="pointer-events-none absolute inset-0 size-full">
                    {/* Report positions are 0-based pixel centres; the SVG's pixel (0, 0) spans 0..1. */}
                    <circle cx={limb!.x! + 0.5} cy={limb!.y! + 0.5} r={limb!.radiusPx!} fill="none" stroke={limb!.verdict === "sound" ? "#4ade80" : "#fbbf24"} strokeDasharray={limb!.verdict === "sound" ? undefined : "6 4"} strokeWidth={2} vectorEffect="non-scaling-stroke" />
                  </svg>
                ) : null}
              </div>
              <figcaption className="text-sm">
                <span className="block truncate font-medium" title={f.name}>
                  {f.name}
                  {f.name === referenceFrame ? " (reference)" : ""}
                </span>
                <span className="block text-ink-muted">
                  {formatExposure(f.exposure?.seconds)}; {verdict}
                  {limb?.rmsPx != null ? `, residual ${limb.rmsPx.toFixed(2)} px` : ""}
                  {f.weights?.weightShare != null ? `; ${Math.round(f.weights.weightShare * 100)}% of the weight` : ""}
                </span>
              </figcaption>
            </figure>
          </li>
        );
      })}
    </ul>
  );
}

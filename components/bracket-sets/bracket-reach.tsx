// "Reach of the bracket": for each light frame, ordered by exposure, the band of
// distances from the Sun's centre where its corona is well exposed (above the
// noise floor, below clipping), drawn on one radius axis in solar radii. Beneath
// the frames, one line shows the bracket's joined reach, so a gap between two
// exposures stands out. The same figures are listed as text under the drawing.
import type { FrameDto } from "@/lib/bracket-sets/dto";
import { findReachGaps } from "@/lib/bracket-sets/triage";
import { formatExposure } from "./exposure-text";

interface Band {
  f: FrameDto;
  from: number | null;
  to: number | null;
  clippedTo: number | null;
  edge: number;
}

const fmt = (r: number) => r.toFixed(2);

export function BracketReach({ frames, moonToSun }: { frames: FrameDto[]; moonToSun: number | null }) {
  // Limb radii to solar radii: the Moon's limb is moonToSun solar radii from the centre during totality.
  const k = moonToSun ?? 1;
  const unit = moonToSun ? "R☉" : "limb radii";
  const bands: Band[] = frames
    .filter((f) => f.kind === "light" && f.ingestState === "ingested" && f.flags.reach && f.exposureS !== null)
    .sort((a, b) => (a.exposureS as number) - (b.exposureS as number) || a.fileName.localeCompare(b.fileName))
    .map((f) => {
      const r = f.flags.reach!;
      return { f, from: r.fromR === null ? null : r.fromR * k, to: r.toR === null ? null : r.toR * k, clippedTo: r.clippedToR === null ? null : r.clippedToR * k, edge: r.edgeR * k };
    });
  if (bands.length === 0) {
    return <p className="text-sm text-ink-muted">The reach of each frame shows here once light frames with an exposure have been measured and their lunar limb found.</p>;
  }
  const included = bands.filter((b) => b.f.included);
  const gaps = findReachGaps(included, k);
  const reached = included.filter((b) => b.to !== null).map((b) => b.to as number);
  const farthest = reached.length ? Math.max(...reached) : null;
  const axisMax = Math.max(2, Math.ceil(Math.max(...bands.map((b) => b.edge))));
  const rowH = 22;
  const pad = { l: 84, r: 16, t: 10, b: 40 };
  const width = 720;
  const height = pad.t + (bands.length + 1.5) * rowH + pad.b;
  const x = (r: number) => pad.l + ((r - 1) / (axisMax - 1)) * (width - pad.l - pad.r);
  const y = (i: number) => pad.t + i * rowH;
  const ticks = Array.from({ length: axisMax }, (_, i) => i + 1);
  const summary =
    `Reach of ${bands.length} frames on one radius axis, shortest exposure at the top. ` +
    (farthest ? `Together the included frames are well exposed from ${fmt(k)} to ${fmt(farthest)} ${unit}` : "No included frame is well exposed anywhere") +
    (gaps.length ? `, with ${gaps.length === 1 ? "a gap" : `${gaps.length} gaps`} where no frame is: ${gaps.map((g) => `${fmt(g.from)} to ${fmt(g.to)}`).join(", ")} ${unit}.` : ", without gaps.");
  return (
    <figure className="flex flex-col gap-2">
      <svg viewBox={`0 0 ${width} ${height}`} className="w-full max-w-3xl rounded-card border border-line bg-surface-raised" role="img" aria-label={summary}>
        <defs>
          <pattern id="reach-clipped" width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
            <rect width="6" height="6" className="fill-surface-raised" />
            <line x1="0" y1="0" x2="0" y2="6" className="stroke-warn" strokeWidth="2" />
          </pattern>
        </defs>
        {ticks.map((t) => (
          <g key={t}>
            <line x1={x(t)} x2={x(t)} y1={pad.t} y2={height - pad.b} className="stroke-line" strokeWidth={0.5} />
            <text x={x(t)} y={height - pad.b + 14} textAnchor="middle" className="fill-ink-muted text-[10px]">
              {t}
            </text>
          </g>
        ))}
        <text x={(pad.l + width - pad.r) / 2} y={height - 8} textAnchor="middle" className="fill-ink-muted text-[11px]">
          Distance from the Sun&apos;s centre ({unit})
        </text>
        {bands.map((b, i) => (
          <g key={b.f.id} opacity={b.f.included ? 1 : 0.45}>
            <text x={pad.l - 6} y={y(i) + 14} textAnchor="end" className="fill-ink text-[10px]">
              {formatExposure(b.f.exposureS)}
            </text>
            {/* The part of the axis inside the frame. */}
            <rect x={x(k)} y={y(i) + 6} width={Math.max(0, x(b.edge) - x(k))} height={rowH - 12} className="fill-surface-sunken" />
            {b.clippedTo !== null ? <rect x={x(k)} y={y(i) + 4} width={Math.max(0, x(b.clippedTo) - x(k))} height={rowH - 8} fill="url(#reach-clipped)" /> : null}
            {b.from !== null && b.to !== null ? <rect x={x(b.from)} y={y(i) + 3} width={Math.max(2, x(b.to) - x(b.from))} height={rowH - 6} rx={3} className="fill-accent" /> : null}
            <title>{`${b.f.fileName}, ${formatExposure(b.f.exposureS)}: ${b.from !== null && b.to !== null ? `well exposed from ${fmt(b.from)} to ${fmt(b.to)} ${unit}` : "nowhere well exposed"}${b.clippedTo !== null ? `, clipped to ${fmt(b.clippedTo)}` : ""}${b.f.included ? "" : ", excluded"}`}</title>
          </g>
        ))}
        <g>
          <text x={pad.l - 6} y={y(bands.length + 0.4) + 14} textAnchor="end" className="fill-ink text-[10px] font-semibold">
            bracket
          </text>
          {included
            .filter((b) => b.from !== null && b.to !== null)
            .map((b) => (
              <rect key={b.f.id} x={x(b.from as number)} y={y(bands.length + 0.4) + 3} width={Math.max(2, x(b.to as number) - x(b.from as number))} height={rowH - 6} className="fill-ok" />
            ))}
          {gaps.map((g) => (
            <rect key={g.from} x={x(g.from)} y={y(bands.length + 0.4) + 1} width={Math.max(2, x(g.to) - x(g.from))} height={rowH - 2} className="fill-danger" />
          ))}
        </g>
      </svg>
      <figcaption className="flex flex-col gap-1 text-sm text-ink-muted">
        <span>
          Each bar is where a frame is well exposed (above its noise floor, below clipping); stripes mark where it clips, grey where the frame still reaches; faint rows are
          excluded frames. The last line joins the included frames, with gaps in red.
          {moonToSun ? "" : " Without the site's ephemeris the axis counts radii of the Moon's limb."}
        </span>
        <span className={gaps.length ? "font-medium text-danger" : ""}>{summary}</span>
      </figcaption>
      <details className="text-sm">
        <summary className="cursor-pointer">The reach as a table</summary>
        <table className="mt-2 border-collapse text-left">
          <caption className="sr-only">Reach of each frame in {unit}</caption>
          <thead>
            <tr>
              <th scope="col" className="px-2 py-1">
                Frame
              </th>
              <th scope="col" className="px-2 py-1">
                Exposure
              </th>
              <th scope="col" className="px-2 py-1">
                Well exposed ({unit})
              </th>
              <th scope="col" className="px-2 py-1">
                Clipped to
              </th>
            </tr>
          </thead>
          <tbody>
            {bands.map((b) => (
              <tr key={b.f.id}>
                <th scope="row" className="px-2 py-1 font-mono font-normal [overflow-wrap:anywhere]">
                  {b.f.fileName}
                </th>
                <td className="px-2 py-1">{formatExposure(b.f.exposureS)}</td>
                <td className="px-2 py-1">{b.from !== null && b.to !== null ? `${fmt(b.from)} – ${fmt(b.to)}` : "nowhere"}</td>
                <td className="px-2 py-1">{b.clippedTo !== null ? fmt(b.clippedTo) : "—"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </details>
    </figure>
  );
}

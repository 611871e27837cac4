import type { FrameDto } from "@/lib/bracket-sets/dto";
import { formatExposure } from "./exposure-text";

type ChartFrame = FrameDto & { groupNumber?: number };

const GROUP_CLASSES = ["fill-accent stroke-accent", "fill-ok stroke-ok", "fill-warn stroke-warn", "fill-danger stroke-danger"];

/**
 * Exposure against time (true UTC, with the camera clock offset applied) for the
 * frames that have both: a bracket shows as a staircase, several brackets as
 * several staircases, a frame out of place stands apart. Colour tells the group;
 * an excluded frame is drawn hollow. The frame table below carries the same data
 * as text.
 */
export function BracketChart({ frames, width = 720, height = 260 }: { frames: ChartFrame[]; width?: number; height?: number }) {
  const points = frames
    .filter((f) => f.correctedCaptureAt && f.exposureS && f.ingestState === "ingested")
    .map((f) => ({ f, t: Date.parse(f.correctedCaptureAt as string), e: Math.log2(f.exposureS as number) }));
  if (points.length < 2) {
    return <p className="text-sm text-ink-muted">The chart of exposure against time appears when two or more frames have both a capture time and an exposure.</p>;
  }
  const pad = { l: 64, r: 16, t: 12, b: 40 };
  const t0 = Math.min(...points.map((p) => p.t));
  const t1 = Math.max(...points.map((p) => p.t));
  const e0 = Math.floor(Math.min(...points.map((p) => p.e)));
  const e1 = Math.ceil(Math.max(...points.map((p) => p.e)));
  const spanT = Math.max(t1 - t0, 1000);
  const spanE = Math.max(e1 - e0, 1);
  const x = (t: number) => pad.l + ((t - t0) / spanT) * (width - pad.l - pad.r);
  const y = (e: number) => height - pad.b - ((e - e0) / spanE) * (height - pad.t - pad.b);
  const yTicks = Array.from({ length: spanE + 1 }, (_, i) => e0 + i).filter((_, i, a) => a.length <= 9 || i % 2 === 0);
  const xTicks = Array.from({ length: 5 }, (_, i) => t0 + (i * spanT) / 4);
  const fmtT = (t: number) => new Date(t).toISOString().slice(11, 19);
  const first = fmtT(t0);
  const last = fmtT(t1);
  return (
    <figure className="flex flex-col gap-2">
      <svg
        viewBox={`0 0 ${width} ${height}`}
        className="w-full max-w-3xl rounded-card border border-line bg-surface-raised"
        role="img"
        aria-label={`Exposure against time: ${points.length} frames from ${first} to ${last} UTC, exposures from ${formatExposure(2 ** e0)} to ${formatExposure(2 ** e1)}.`}
      >
        {yTicks.map((e) => (
          <g key={`y${e}`}>
            <line x1={pad.l} x2={width - pad.r} y1={y(e)} y2={y(e)} className="stroke-line" strokeWidth={0.5} />
            <text x={pad.l - 6} y={y(e) + 4} textAnchor="end" className="fill-ink-muted text-[10px]">
              {formatExposure(2 ** e)}
            </text>
          </g>
        ))}
        {xTicks.map((t, i) => (
          <text key={`x${i}`} x={x(t)} y={height - pad.b + 16} textAnchor="middle" className="fill-ink-muted text-[10px]">
            {fmtT(t)}
          </text>
        ))}
        <text x={(pad.l + width - pad.r) / 2} y={height - 6} textAnchor="middle" className="fill-ink-muted text-[11px]">
          True time (UTC)
        </text>
        {points.map(({ f, t, e }) => {
          const cls = GROUP_CLASSES[((f.groupNumber ?? 1) - 1) % GROUP_CLASSES.length];
          return (
            <circle key={f.id} cx={x(t)} cy={y(e)} r={4} className={cls} fillOpacity={f.included ? 0.9 : 0} strokeWidth={1.5}>
              <title>{`${f.fileName}: ${formatExposure(f.exposureS as number)} at ${fmtT(t)} UTC, group ${f.groupNumber ?? 1}${f.included ? "" : ", excluded"}`}</title>
            </circle>
          );
        })}
      </svg>
      <figcaption className="text-sm text-ink-muted">Exposure (log scale) against true time. Colours are groups; hollow points are excluded frames.</figcaption>
    </figure>
  );
}

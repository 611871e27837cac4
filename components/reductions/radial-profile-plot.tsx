import { useId } from "react";
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import type { RadialProfileView } from "@/lib/reductions/report-schema";

const W = 640;
const H = 360;
const M = { left: 72, right: 16, top: 16, bottom: 52 };

function formatValue(v: number): string {
  return v === 0 ? "0" : Math.abs(v) >= 1e4 || Math.abs(v) < 1e-2 ? v.toExponential(2) : v.toPrecision(3);
}

/** Ticks of a linear axis: a step of 1, 2 or 5 times a power of ten giving about `count` ticks. */
function linearTicks(lo: number, hi: number, count = 6): number[] {
  const raw = (hi - lo) / count;
  const p = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * p).find((s) => s >= raw) ?? 10 * p;
  const out: number[] = [];
  for (let t = Math.ceil(lo / step) * step; t <= hi + 1e-9; t += step) out.push(Number(t.toFixed(6)));
  return out;
}

/**
 * The radial brightness profile as an SVG line on a log brightness scale
 * against distance in solar radii, with the same numbers as a table for
 * screen readers and anyone who wants the values.
 */
export function RadialProfilePlot({ profile }: { profile: RadialProfileView }) {
  const titleId = useId();
  const descId = useId();
  const rings = profile.rings.filter((r) => r.meanLuminance > 0);
  if (rings.length < 2) {
    return <p className="text-ink-muted">Too few rings with light to draw a profile.</p>;
  }
  const x0 = Math.min(...rings.map((r) => r.innerR));
  const x1 = Math.max(...rings.map((r) => r.outerR));
  const logs = rings.map((r) => Math.log10(r.meanLuminance));
  const y0 = Math.floor(Math.min(...logs));
  const y1 = Math.ceil(Math.max(...logs)) === y0 ? y0 + 1 : Math.ceil(Math.max(...logs));
  const sx = (r: number) => M.left + ((r - x0) / (x1 - x0)) * (W - M.left - M.right);
  const sy = (l: number) => H - M.bottom - ((l - y0) / (y1 - y0)) * (H - M.top - M.bottom);
  const points = rings.map((r, i) => `${sx(r.meanR).toFixed(1)},${sy(logs[i]).toFixed(1)}`).join(" ");
  const decades = Array.from({ length: y1 - y0 + 1 }, (_, k) => y0 + k);
  const first = rings[0];
  const last = rings[rings.length - 1];
  const summary =
    `Mean brightness falls from ${formatValue(first.meanLuminance)} at ${first.meanR.toFixed(2)} solar radii to ${formatValue(last.meanLuminance)} at ${last.meanR.toFixed(2)} solar radii` +
    (profile.powerLaw?.exponent != null ? `, roughly as r to the power −${profile.powerLaw.exponent.toFixed(2)} between ${profile.powerLaw.fromR} and ${profile.powerLaw.toR} solar radii.` : ".");

  return (
    <div className="flex flex-col gap-3">
      <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-labelledby={`${titleId} ${descId}`} className="h-auto w-full max-w-3xl text-ink">
        <title id={titleId}>Radial brightness profile</title>
        <desc id={descId}>{summary}</desc>
        {decades.map((d) => (
          <g key={d}>
            <line x1={M.left} x2={W - M.right} y1={sy(d)} y2={sy(d)} className="stroke-line" strokeWidth={1} />
            <text x={M.left - 8} y={sy(d) + 4} textAnchor="end" className="fill-ink-muted text-[12px]">
              10
              <tspan dy={-6} className="text-[9px]">
                {d}
              </tspan>
            </text>
          </g>
        ))}
        {linearTicks(x0, x1).map((t) => (
          <g key={t}>
            <line x1={sx(t)} x2={sx(t)} y1={H - M.bottom} y2={H - M.bottom + 5} className="stroke-ink-muted" strokeWidth={1} />
            <text x={sx(t)} y={H - M.bottom + 19} textAnchor="middle" className="fill-ink-muted text-[12px]">
              {t}
            </text>
          </g>
        ))}
        <line x1={M.left} x2={W - M.right} y1={H - M.bottom} y2={H - M.bottom} className="stroke-ink-muted" strokeWidth={1} />
        <line x1={M.left} x2={M.left} y1={M.top} y2={H - M.bottom} className="stroke-ink-muted" strokeWidth={1} />
        <polyline points={points} fill="none" className="stroke-accent" strokeWidth={2} strokeLinejoin="round" />
        {rings.map((r, i) => (
          <circle key={r.innerR} cx={sx(r.meanR)} cy={sy(logs[i])} r={r.ringFraction < 0.5 ? 2 : 3} className={r.ringFraction < 0.5 ? "fill-ink-muted" : "fill-accent"} />
        ))}
        <text x={(M.left + W - M.right) / 2} y={H - 10} textAnchor="middle" className="fill-ink text-[13px]">
          Distance from the Sun&apos;s centre (solar radii)
        </text>
        <text transform={`translate(16 ${(M.top + H - M.bottom) / 2}) rotate(-90)`} textAnchor="middle" className="fill-ink text-[13px]">
          Mean brightness (log scale)
        </text>
      </svg>
      <p className="text-sm text-ink-muted">
        {summary} Small grey points are rings that the frame edge cuts to less than half their area.
        {profile.centreSource === "moon" ? " No observing site was known, so the Moon's centre and radius stand in for the Sun's: radii are overstated by a few percent." : ""}
      </p>
      <details>
        <summary className="cursor-pointer font-medium">The profile as a table</summary>
        <Table caption="Mean brightness in rings about the Sun's centre" wrapperClassName="mt-3 max-h-96 overflow-y-auto">
          <TableHead>
            <TableRow>
              <TableHeader>Ring (solar radii)</TableHeader>
              <TableHeader>Mean distance</TableHeader>
              <TableHeader>Mean brightness</TableHeader>
              <TableHeader>Pixels</TableHeader>
              <TableHeader>Share of ring in frame</TableHeader>
            </TableRow>
          </TableHead>
          <TableBody>
            {profile.rings.map((r) => (
              <TableRow key={r.innerR}>
                <TableCell className="font-mono">
                  {r.innerR.toFixed(2)}–{r.outerR.toFixed(2)}
                </TableCell>
                <TableCell className="font-mono">{r.meanR.toFixed(3)}</TableCell>
                <TableCell className="font-mono">{formatValue(r.meanLuminance)}</TableCell>
                <TableCell className="font-mono">{r.pixelCount}</TableCell>
                <TableCell className="font-mono">{Math.round(r.ringFraction * 100)}%</TableCell>
              </TableRow>
            ))}
          </TableBody>
        </Table>
      </details>
    </div>
  );
}

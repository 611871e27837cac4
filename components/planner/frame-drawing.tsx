import type { PlanResult } from "@/lib/planner/plan";

/**
 * The sensor frame over the eclipsed Sun, in solar radii: rings at 1 to 4
 * radii around the Sun's centre, the Moon's disk, and where solar north will
 * point in the image (counter-clockwise from up) when the mount tells us.
 */
export function FrameDrawing({ plan }: { plan: PlanResult }) {
  const frame = plan.frame;
  const half = Math.max(4.6, frame ? Math.max(frame.widthRsun, frame.heightRsun) / 2 + 0.3 : 0);
  const moonR = plan.moonSemiDiameterArcsec / plan.sunSemiDiameterArcsec;
  const north = plan.solarNorthInImageDeg;
  // Counter-clockwise from image up, with SVG y pointing down.
  const arrow = north === null ? null : { x: -Math.sin((north * Math.PI) / 180), y: -Math.cos((north * Math.PI) / 180) };
  const describe = [
    frame ? `The sensor covers ${frame.widthRsun.toFixed(1)} by ${frame.heightRsun.toFixed(1)} solar radii.` : "No sensor size given: rings only.",
    "Rings at 1, 2, 3 and 4 solar radii around the Sun's centre.",
    north === null ? "Solar north cannot be predicted for this mount." : `Solar north points ${north.toFixed(0)} degrees counter-clockwise from the top of the image.`,
  ].join(" ");
  return (
    <figure className="flex flex-col items-start gap-2">
      <svg viewBox={`${-half} ${-half} ${2 * half} ${2 * half}`} className="w-full max-w-md rounded-card bg-black" role="img" aria-label={describe}>
        {[4, 3, 2].map((r) => (
          <circle key={r} r={r} fill="none" stroke="#e9c46a" strokeOpacity={0.35 + 0.1 * (4 - r)} strokeWidth={0.03} strokeDasharray="0.12 0.08" />
        ))}
        <circle r={1.6} fill="#e9c46a" fillOpacity={0.08} />
        <circle r={1} fill="none" stroke="#e9c46a" strokeWidth={0.04} />
        <circle r={moonR} fill="#000" stroke="#555" strokeWidth={0.02} />
        {[1, 2, 3, 4].map((r) => (
          <text key={r} x={r * 0.707 + 0.05} y={-r * 0.707 - 0.05} fontSize={0.32} fill="#cdd4df">
            {r}
          </text>
        ))}
        {frame ? (
          <rect x={-frame.widthRsun / 2} y={-frame.heightRsun / 2} width={frame.widthRsun} height={frame.heightRsun} fill="none" stroke="#7dd3a0" strokeWidth={0.05} />
        ) : null}
        {arrow ? (
          <g stroke="#f4978e" strokeWidth={0.06} fill="#f4978e">
            <line x1={0} y1={0} x2={arrow.x * 3.6} y2={arrow.y * 3.6} />
            <text x={arrow.x * 4.05 - 0.15} y={arrow.y * 4.05 + 0.12} fontSize={0.4} stroke="none">
              N
            </text>
          </g>
        ) : null}
      </svg>
      <figcaption className="text-sm text-ink-muted">{describe}</figcaption>
    </figure>
  );
}

/**
 * A frame's luminance histogram as a small bar chart: 64 bins from black to the
 * white level, counts on a log scale so that the faint corona's share shows
 * next to the bright inner corona. The bin at the right edge is the clipped one.
 */
export function FrameHistogram({ bins, label, width = 96, height = 28 }: { bins: number[] | undefined; label: string; width?: number; height?: number }) {
  if (!bins || bins.length === 0) return <span className="text-ink-muted">—</span>;
  const logs = bins.map((c) => Math.log10(1 + c));
  const max = Math.max(...logs, 1e-9);
  const total = bins.reduce((s, c) => s + c, 0);
  const top = total ? (100 * bins[bins.length - 1]) / total : 0;
  const w = width / bins.length;
  return (
    <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} role="img" aria-label={`${label}: histogram, ${top.toFixed(1)} % of pixels in the brightest bin`}>
      <rect x={0} y={0} width={width} height={height} className="fill-surface-raised" />
      {logs.map((l, i) => {
        const h = (l / max) * (height - 2);
        return <rect key={i} x={i * w} y={height - h} width={Math.max(w - 0.3, 0.5)} height={h} className={i === bins.length - 1 && bins[i] > 0 ? "fill-danger" : "fill-accent"} />;
      })}
    </svg>
  );
}

import type { ReductionReportView } from "@/lib/reductions/report-view";

type Frame = ReductionReportView["frames"][number];

// lib/imaging/types.ts BlackLevelSource, in words.
const OFFSET_SOURCES: Record<string, string> = {
  calibrated: "from the bias or dark frames",
  file: "stated in the file",
  solved: "found from the bracket",
  none: "none found, taken as zero",
};

function formatExposure(s: number | null | undefined): string {
  if (s == null) return "unknown";
  if (s >= 1) return `${Number(s.toPrecision(3))} s`;
  const inverse = 1 / s;
  // A fraction only where the value is one (1/250 s); otherwise the seconds as given.
  return Math.abs(inverse - Math.round(inverse)) < 0.01 * inverse ? `1/${Math.round(inverse)} s` : `${Number(s.toPrecision(3))} s`;
}

function describeOffset(f: Frame): string {
  const o = f.offset;
  if (!o) return "not applicable (8-bit frame)";
  const value = o.dn == null ? "" : `${o.dn.toFixed(1)} DN`;
  const sigma = o.source === "solved" && o.sigmaDn != null ? ` ± ${o.sigmaDn.toFixed(1)}` : "";
  return `${value}${sigma}, ${OFFSET_SOURCES[o.source] ?? o.source}`;
}

function describePlacement(f: Frame): string {
  if (f.registrationMethod === "reference") return "the reference";
  if (f.registrationMethod === "limb") return "by its limb alone";
  return "on the corona";
}

/**
 * What the reduction corrected in each frame (offset, light, placement, outliers
 * taken out) and which frames it left out and why, so that every correction and
 * every frame left out is named on the page.
 */
export function FrameCorrections({ report }: { report: ReductionReportView }) {
  const leftOut = report.framesLeftOut ?? [];
  const notes = (report.notes ?? []).filter((n) => !n.startsWith("Tile pyramids") && !n.startsWith("master.fits carries") && !n.startsWith("Renditions, preview"));
  const remarks = report.frames.flatMap((f) => [f.offset?.note, f.transmissionNote, f.registrationNote].filter((x): x is string => Boolean(x)).map((text) => ({ name: f.name, text })));
  return (
    <div className="flex flex-col gap-6">
      {notes.length > 0 ? (
        <ul className="flex flex-col gap-2" aria-label="What the reduction decided">
          {notes.map((n) => (
            <li key={n} className="rounded-control border border-warn/50 bg-warn/10 px-3 py-2">{n}</li>
          ))}
        </ul>
      ) : null}
      <div>
        <h3 className="mb-2 font-semibold">Frames left out</h3>
        {leftOut.length === 0 ? (
          <p className="text-ink-muted">None: every frame was used.</p>
        ) : (
          <ul className="flex flex-col gap-1" aria-label="Frames left out">
            {leftOut.map((l) => (
              <li key={l.name} className="break-words">
                <span className="font-medium">{l.name}</span>: {l.reason}
              </li>
            ))}
          </ul>
        )}
      </div>
      <div className="overflow-x-auto">
        <table className="w-full min-w-0 text-sm">
          <caption className="mb-2 text-left font-semibold">Corrections per frame</caption>
          <thead>
            <tr className="border-b border-line text-left">
              <th scope="col" className="py-1 pr-3">Frame</th>
              <th scope="col" className="py-1 pr-3">Exposure</th>
              <th scope="col" className="py-1 pr-3">Offset</th>
              <th scope="col" className="py-1 pr-3">Light received</th>
              <th scope="col" className="py-1 pr-3">Placed</th>
              <th scope="col" className="py-1">Pixels taken out</th>
            </tr>
          </thead>
          <tbody>
            {report.frames.map((f) => (
              <tr key={f.name} className="border-b border-line/60 align-top">
                <th scope="row" className="py-1 pr-3 text-left font-normal [overflow-wrap:anywhere]">{f.name}</th>
                <td className="py-1 pr-3 whitespace-nowrap">{formatExposure(f.exposure?.seconds)}</td>
                <td className="py-1 pr-3">{describeOffset(f)}</td>
                <td className="py-1 pr-3 whitespace-nowrap">{f.transmission == null ? "—" : `${Math.round(100 * f.transmission)} %`}</td>
                <td className="py-1 pr-3">{describePlacement(f)}</td>
                <td className="py-1 whitespace-nowrap">{f.weights?.rejectedFraction == null ? "—" : `${(100 * f.weights.rejectedFraction).toFixed(2)} %`}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="mt-2 text-sm text-ink-muted">
          Light received is each frame&apos;s light against what its exposure implies, measured where frames overlap; a frame dimmed by cloud counts with less weight.
          Pixels taken out are where one frame disagreed with all the others (a trail, a cosmic ray, a hot pixel).
        </p>
      </div>
      {remarks.length > 0 ? (
        <ul className="flex flex-col gap-1" aria-label="Remarks on frames">
          {remarks.map((r) => (
            <li key={`${r.name}-${r.text}`} className="break-words">
              <span className="font-medium">{r.name}</span>: {r.text}
            </li>
          ))}
        </ul>
      ) : null}
    </div>
  );
}

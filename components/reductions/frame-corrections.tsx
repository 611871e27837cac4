import type { ParsedReport } from "@/lib/reductions/report-schema";

type Frame = ParsedReport["frames"][number];

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
// lib/imaging/calibrate.ts CalibrationSummary["darkModel"], in words.
const DARK_MODELS: Record<string, string> = {
  scaled: "scaled by exposure time over the bias",
  fitted: "fitted per pixel (offset and dark current) from darks at several exposures",
  "nearest-unscaled": "the nearest dark used as it is",
  none: "",
};

function plural(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`;
}

/** One sentence on the calibration the reduction applied. */
function describeCalibration(calibration: ParsedReport["calibration"]): string {
  if (!calibration || calibration.source === "none") return "No calibration frames were given and no sensor defects were found in the bracket.";
  if (calibration.source === "bracket") return `No calibration frames were given; ${plural(calibration.badPixelCount, "sensor defect")} (pixels that stay bright at one place on the sensor through the bracket) were found in the frames themselves and masked.`;
  const m = calibration.masters;
  const parts: string[] = [];
  if (m?.bias) parts.push(`a bias master from ${plural(m.bias.frameNames.length, "frame")}`);
  if (m && m.darks.length > 0) {
    const model = DARK_MODELS[m.darkModel] ? `, ${DARK_MODELS[m.darkModel]}` : "";
    parts.push(`dark masters at ${plural(m.darks.length, "exposure")} from ${plural(m.darks.reduce((s, d) => s + d.frameNames.length, 0), "frame")}${model}`);
  }
  if (m?.flat) parts.push(`a flat from ${plural(m.flat.frameNames.length, "frame")}, normalised to its median`);
  return `Calibrated with ${parts.join("; ") || "the set's calibration frames"}; ${plural(calibration.badPixelCount, "sensor defect")} (hot, stuck or dead pixels) masked in every frame.`;
}

export function FrameCorrections({ report }: { report: ParsedReport }) {
  const leftOut = report.framesLeftOut ?? [];
  const notes = (report.notes ?? []).filter((n) => !n.startsWith("Tile pyramids") && !n.startsWith("master.fits carries") && !n.startsWith("Renditions, preview"));
  const remarks = report.frames.flatMap((f) => [f.offset?.note, f.transmissionNote, f.registrationNote].filter((x): x is string => Boolean(x)).map((text) => ({ name: f.name, text })));
  return (
    <div className="flex flex-col gap-6">
      <p>{describeCalibration(report.calibration)}</p>
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
      {/* A wide table scrolls inside its own box on a phone; the box takes the focus so the keyboard can scroll it too. */}
      <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Corrections per frame, scrollable">
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

import {
  computeEffectiveFocalMm,
  computeExpectedPlateScaleArcsecPerPx,
  computeFieldInSolarRadii,
  computeSunImageSize,
} from "@/lib/astro/plate-scale";
import type { KitDto } from "@/lib/kits/kits";

/** What a kit will record: plate scale, the Sun's image and the field in solar radii. */
export function KitOptics({ kit }: { kit: KitDto }) {
  const scale = computeExpectedPlateScaleArcsecPerPx(kit);
  const sun = computeSunImageSize(kit);
  const field = computeFieldInSolarRadii(kit);
  const rows: [string, string][] = [
    ["Effective focal length", `${computeEffectiveFocalMm(kit).toFixed(0)} mm at f/${(kit.fNumber * kit.teleconverter).toFixed(1)}`],
    ["Plate scale", `${scale.toFixed(2)} arcsec per pixel`],
    ["Sun's image", `${sun.diameterMm.toFixed(2)} mm across, ${sun.diameterPx.toFixed(0)} pixels`],
    ["Field of view", `${field.widthRsun.toFixed(1)} × ${field.heightRsun.toFixed(1)} solar radii`],
    ["Corona in frame (Sun centred)", `to ${field.reachToEdgeRsun.toFixed(1)} solar radii at the nearer edge, ${field.reachToCornerRsun.toFixed(1)} in the corners`],
  ];
  return (
    <section aria-labelledby="kit-optics" className="rounded-card border border-line bg-surface-raised p-5">
      <h2 id="kit-optics" className="mb-3 text-xl font-semibold">
        What this kit records
      </h2>
      <dl className="grid grid-cols-1 gap-x-6 gap-y-2 sm:grid-cols-[max-content_1fr]">
        {rows.map(([k, v]) => (
          <div key={k} className="contents">
            <dt className="text-ink-muted">{k}</dt>
            <dd className="font-mono">{v}</dd>
          </div>
        ))}
      </dl>
      <p className="mt-3 text-sm text-ink-muted">
        The Sun&apos;s size uses its mean apparent radius (959.63 arcsec at 1 au); the planner uses the day&apos;s value.
      </p>
    </section>
  );
}

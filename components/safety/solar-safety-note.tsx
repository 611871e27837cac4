import { cx } from "@/components/ui/cx";

/**
 * The standard cautions, wherever the product helps someone point optics at
 * the Sun (planner, kit pages, upload guide).
 */
export function SolarSafetyNote({ className }: { className?: string }) {
  return (
    <aside aria-labelledby="solar-safety-title" className={cx("rounded-card border border-warn/60 bg-warn/10 p-4 text-warn", className)}>
      <h2 id="solar-safety-title" className="font-semibold">
        Eye and camera safety
      </h2>
      <ul className="mt-2 list-disc space-y-1 pl-5 text-sm">
        <li>Look at the partly eclipsed Sun only through certified solar viewers (ISO 12312-2).</li>
        <li>Cameras, lenses and telescopes need a full-aperture solar filter made for that optic, fitted securely at the front.</li>
        <li>Remove the filter only during totality, and put it back before third contact ends, when the Sun reappears.</li>
        <li>Follow local guidance and the advice of experienced observers at your site.</li>
      </ul>
    </aside>
  );
}

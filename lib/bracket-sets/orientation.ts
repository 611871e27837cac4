// Where a reduction aligned on the Sun will get north in the image from, said
// before the run: the angle the photographer gave, the kit's mount, or an
// estimate from the Moon's motion over the bracket (which a bracket of a few
// seconds rarely allows: the Moon moves 0.3 to 0.5 arcsec a second against the
// Sun, DESIGN.md section 4). Client-safe.
import type { Mount } from "@/db/schema";

export type OrientationSource = "given" | "mount" | "estimated";

export interface OrientationOutlook {
  source: OrientationSource;
  /** One sentence for the page. */
  text: string;
  /** True when the page should ask for the mount or the angle before a run. */
  needsAnswer: boolean;
}

/** Mounts that tie the image to the sky (north fixed, or the zenith up on a levelled camera). */
export const ORIENTING_MOUNTS: ReadonlySet<Mount> = new Set(["equatorial", "alt-az", "fixed-tripod"]);

const MOUNT_WORDS: Record<Mount, string> = {
  equatorial: "equatorial mount",
  "alt-az": "alt-azimuth mount",
  "fixed-tripod": "fixed tripod",
  "hand-held": "hand-held camera",
  stabilised: "stabilised platform",
};

export function describeOrientation(kit: { name: string; mount: Mount } | null, northAngleDeg: number | null): OrientationOutlook {
  if (northAngleDeg !== null) {
    return { source: "given", needsAnswer: false, text: `North is ${Math.abs(northAngleDeg).toFixed(1)}° ${northAngleDeg >= 0 ? "counter-clockwise" : "clockwise"} from the top of the image, as you gave it.` };
  }
  if (kit && ORIENTING_MOUNTS.has(kit.mount)) {
    return { source: "mount", needsAnswer: false, text: `North in the image comes from the ${MOUNT_WORDS[kit.mount]} of the kit “${kit.name}”.` };
  }
  const why = kit ? `The kit “${kit.name}” is a ${MOUNT_WORDS[kit.mount]}, which does not say where north is in the image` : "No kit is chosen, so nothing says where north is in the image";
  return {
    source: "estimated",
    needsAnswer: true,
    text: `${why}. A reduction aligned on the Sun's centre will try to estimate it from the Moon's motion over the bracket, which a bracket of a few seconds rarely allows; if it cannot, north stays unknown. Choose the kit and its mount, or give the north angle.`,
  };
}

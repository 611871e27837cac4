// A field plan: what a photographer at one site, with one kit, needs before an
// eclipse. Pure: numbers in, numbers out, on lib/astro.
import { AstroError } from "@/lib/astro/errors";
import { buildExposureLadder, type LadderStep, type Phenomenon } from "@/lib/astro/exposure";
import { findLocalCircumstances, findLocalCircumstancesOnTrack, type ContactEvent, type LocalCircumstances } from "@/lib/astro/local-circumstances";
import { interpolateTrack } from "@/lib/astro/track-interpolate";
import type { TrackPoint } from "@/lib/astro/track-parse";
import { computeNorthAngleInImageDeg, type MountKind } from "@/lib/astro/mount-rotation";
import { computeFieldInSolarRadii, computeSunImageSize } from "@/lib/astro/plate-scale";
import { computeSunMoonState } from "@/lib/astro/positions";
import type { SiteLocation } from "@/lib/astro/site-time";

export interface PlanKit {
  name: string;
  fNumber: number;
  focalMm?: number;
  teleconverter?: number;
  pixelPitchUm?: number;
  sensorWidthMm?: number;
  sensorHeightMm?: number;
  mount?: MountKind;
  flipHorizontal?: boolean;
  flipVertical?: boolean;
}

export interface PlanInput {
  eclipseId: string;
  eclipsePeakUtcMs: number;
  /** For a moving site, the track: each contact is computed where the ship or aircraft is then. */
  site: SiteLocation & { name: string; track?: readonly TrackPoint[] };
  kit: PlanKit;
  isos: number[];
}

export type TimelineKey = "C1" | "C2" | "MAX" | "C3" | "C4";

export interface TimelineEvent {
  key: TimelineKey;
  label: string;
  utcMs: number;
  sunAltDeg: number;
  sunAzDeg: number;
  /** Seconds from second contact (negative before), for countdowns; null without totality. */
  fromSecondContactS: number | null;
  /** What to do then: filters, exposures. */
  advice: string;
}

export interface PlanResult {
  circumstances: LocalCircumstances;
  timeline: TimelineEvent[];
  ladder: LadderStep[];
  /** At maximum: the Sun's and Moon's apparent radii, the solar P angle. */
  sunSemiDiameterArcsec: number;
  moonSemiDiameterArcsec: number;
  pDeg: number;
  /** Position angle of celestial north in the image at maximum, counter-clockwise from up; null without a mount reference. */
  northInImageDeg: number | null;
  /** Solar north in the image: north's angle plus P. */
  solarNorthInImageDeg: number | null;
  frame: { widthRsun: number; heightRsun: number; reachToEdgeRsun: number; reachToCornerRsun: number; sunDiameterPx: number | null } | null;
}

/** During totality only: the corona ladder; partial phases always through a filter. */
const TOTALITY_PHENOMENA: Phenomenon[] = ["prominences", "corona-0.1", "corona-0.2", "corona-0.5", "corona-1", "corona-2", "corona-4", "corona-8"];
const PARTIAL_PHENOMENA: Phenomenon[] = ["partial-nd5", "partial-nd4"];
const EDGE_PHENOMENA: Phenomenon[] = ["bailys-beads", "chromosphere"];

export const PLAN_PHENOMENA: Phenomenon[] = [...PARTIAL_PHENOMENA, ...EDGE_PHENOMENA, ...TOTALITY_PHENOMENA];

/** Contact times are known to about a second; everything shown to people is rounded to the nearest one. */
export function roundToSecondMs(utcMs: number): number {
  return Math.round(utcMs / 1000) * 1000;
}

function event(key: TimelineKey, label: string, c: ContactEvent, c2: number | null, advice: string): TimelineEvent {
  return {
    key,
    label,
    // Whole seconds, once: the page, the countdown and the calendar file all show this same instant.
    utcMs: roundToSecondMs(c.utcMs),
    sunAltDeg: c.sunApparentAltDeg,
    sunAzDeg: c.sunAzDeg,
    fromSecondContactS: c2 === null ? null : Math.round((roundToSecondMs(c.utcMs) - roundToSecondMs(c2)) / 1000),
    advice,
  };
}

export function computeFieldPlan(input: PlanInput): PlanResult {
  const track = input.site.track;
  const circumstances = track ? findLocalCircumstancesOnTrack(track, input.eclipsePeakUtcMs) : findLocalCircumstances(input.site, input.eclipsePeakUtcMs);
  const central = circumstances.kind === "total";
  const c2 = circumstances.secondContact?.utcMs ?? null;
  const timeline: TimelineEvent[] = [
    event("C1", "First contact: the partial phase begins", circumstances.firstContact, c2, "Solar filter on. Photograph the partial phase through it."),
  ];
  if (circumstances.secondContact) {
    timeline.push(
      event(
        "C2",
        central ? "Second contact: totality begins" : "Second contact: annularity begins",
        circumstances.secondContact,
        c2,
        central
          ? "Beads and chromosphere at the fastest speeds; the filter comes off only once the last bead is gone."
          : "Annular: the filter stays on throughout.",
      ),
    );
  }
  timeline.push(
    event("MAX", "Maximum eclipse", circumstances.maximum, c2, central ? "Run the corona bracket, shortest to longest." : "Filter on."),
  );
  if (circumstances.thirdContact) {
    timeline.push(
      event(
        "C3",
        central ? "Third contact: totality ends" : "Third contact: annularity ends",
        circumstances.thirdContact,
        c2,
        central ? "Filter back on as the first bead appears." : "Filter on.",
      ),
    );
  }
  timeline.push(event("C4", "Fourth contact: the eclipse ends", circumstances.fourthContact, c2, "Filter on until you put the camera away."));

  // Where the observer is at maximum (a moving site rests at its track's ends outside it).
  const at = track
    ? interpolateTrack(track, Math.min(Math.max(circumstances.maximum.utcMs, track[0].timeMs), track[track.length - 1].timeMs))
    : input.site;
  const state = computeSunMoonState(at, circumstances.maximum.utcMs);
  const pDeg = state.pDeg;
  // Without totality there is no corona to bracket: only the filtered partial phase.
  const ladder = buildExposureLadder({ fNumber: input.kit.fNumber * (input.kit.teleconverter ?? 1), isos: input.isos, phenomena: central ? PLAN_PHENOMENA : PARTIAL_PHENOMENA });

  let northInImageDeg: number | null = null;
  if (input.kit.mount) {
    northInImageDeg = computeNorthAngleInImageDeg(
      { mount: input.kit.mount, flipHorizontal: input.kit.flipHorizontal, flipVertical: input.kit.flipVertical },
      at,
      circumstances.maximum.utcMs,
    );
  }

  const k = input.kit;
  let frame: PlanResult["frame"] = null;
  if (k.focalMm && k.sensorWidthMm && k.sensorHeightMm) {
    const optics = { focalMm: k.focalMm, teleconverter: k.teleconverter, pixelPitchUm: k.pixelPitchUm ?? 1, sensorWidthMm: k.sensorWidthMm, sensorHeightMm: k.sensorHeightMm };
    const f = computeFieldInSolarRadii(optics, state.sun.semiDiameterArcsec);
    frame = { ...f, sunDiameterPx: k.pixelPitchUm ? computeSunImageSize(optics, state.sun.semiDiameterArcsec).diameterPx : null };
  }

  return {
    circumstances,
    timeline,
    ladder,
    sunSemiDiameterArcsec: state.sun.semiDiameterArcsec,
    moonSemiDiameterArcsec: state.moon.semiDiameterArcsec,
    pDeg,
    northInImageDeg,
    solarNorthInImageDeg: northInImageDeg === null ? null : northInImageDeg + pDeg,
    frame,
  };
}

export function isNotVisible(err: unknown): err is AstroError {
  return err instanceof AstroError && err.code === "not-found";
}

// Files a photographer takes into the field: the timeline as iCalendar (RFC
// 5545, through the ics package) and the exposure ladder as CSV (RFC 4180).
import { createEvents, type EventAttributes } from "ics";
import type { PlanResult } from "./plan";

const PHENOMENON_LABELS: Record<string, string> = {
  "partial-nd5": "Partial phase, ND 5.0 filter",
  "partial-nd4": "Partial phase, ND 4.0 filter",
  "bailys-beads": "Baily's beads",
  chromosphere: "Chromosphere",
  prominences: "Prominences",
  "corona-0.1": "Corona to 0.1 solar radii",
  "corona-0.2": "Corona to 0.2 solar radii",
  "corona-0.5": "Corona to 0.5 solar radii",
  "corona-1": "Corona to 1 solar radius",
  "corona-2": "Corona to 2 solar radii",
  "corona-4": "Corona to 4 solar radii",
  "corona-8": "Corona to 8 solar radii",
};

export function describePhenomenon(p: string): string {
  return PHENOMENON_LABELS[p] ?? p;
}

export function buildTimelineCalendar(plan: PlanResult, context: { eclipseId: string; siteName: string; latDeg: number; lonDeg: number }): string {
  const events: EventAttributes[] = plan.timeline.map((e) => ({
    uid: `${context.eclipseId}-${e.key}-${context.latDeg.toFixed(4)}-${context.lonDeg.toFixed(4)}@crownlight`,
    // The timeline is already in whole seconds (iCalendar has no fractions), as the page shows it.
    start: e.utcMs,
    startInputType: "utc",
    startOutputType: "utc",
    // Contacts are instants; a one-minute event shows in every calendar.
    duration: { minutes: 1 },
    title: `${e.label} (${context.siteName})`,
    description: `${e.advice}\nSun altitude ${e.sunAltDeg.toFixed(1)} degrees, azimuth ${e.sunAzDeg.toFixed(1)} degrees.\nOnly certified solar filters; off only in totality; follow local guidance.`,
    geo: { lat: Number(context.latDeg.toFixed(4)), lon: Number(context.lonDeg.toFixed(4)) },
    alarms: e.key === "C2" ? [{ action: "display", description: "Second contact in 5 minutes", trigger: { minutes: 5, before: true } }] : undefined,
  }));
  const { error, value } = createEvents(events, { productId: "crownlight/field-planner", calName: `Eclipse ${context.eclipseId}` });
  if (error || !value) throw new Error(`could not build the calendar: ${error?.message ?? "no output"}`);
  return value;
}

const csvCell = (v: string | number | null) => {
  const s = v === null ? "" : String(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
};

export function buildLadderCsv(plan: PlanResult): string {
  const header = ["phenomenon", "iso", "f_number", "exposure_s", "marked_speed", "reach_rsun", "filter_density"];
  const rows = plan.ladder.map((s) => [
    describePhenomenon(s.phenomenon),
    s.iso,
    Number(s.fNumber.toFixed(2)),
    Number(s.exposureS.toPrecision(4)),
    s.nominal.label,
    s.reachRsun,
    s.filterDensity,
  ]);
  return [header, ...rows].map((r) => r.map(csvCell).join(",")).join("\r\n") + "\r\n";
}

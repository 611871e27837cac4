// The camera clock's offset from a frame that photographed a trusted clock.
import { AppError } from "@/lib/errors";

/** The largest offset we take, as for one typed in: a day either way. */
export const MAX_CLOCK_OFFSET_S = 86_400;

/**
 * Seconds the camera clock ran ahead of UTC: the frame's capture time as the
 * camera recorded it minus the true time the photographed clock showed
 * (negative when the camera was behind). True time = camera time - offset.
 */
export function computeClockOffsetS(captureMs: number, shownAtMs: number): number {
  return (captureMs - shownAtMs) / 1000;
}

/** The offset from a frame, refused when the frame has no capture time or the offset is absurd. */
export function clockOffsetFromFrame(frame: { fileName: string; captureMs: number | null }, shownAtIso: string): number {
  if (frame.captureMs === null) {
    throw new AppError("invalid_input", `${frame.fileName} has no capture time, so the clock it shows cannot set the offset; choose a frame whose file records when it was taken.`, [
      { field: "clockFrameId", message: `${frame.fileName} has no capture time` },
    ]);
  }
  const shownAtMs = Date.parse(shownAtIso);
  if (!Number.isFinite(shownAtMs)) {
    throw new AppError("invalid_input", `"${shownAtIso}" is not a time.`, [{ field: "clockShownAt", message: "expected an ISO 8601 time" }]);
  }
  const offsetS = computeClockOffsetS(frame.captureMs, shownAtMs);
  if (Math.abs(offsetS) > MAX_CLOCK_OFFSET_S) {
    throw new AppError("invalid_input", `${frame.fileName} was taken ${Math.abs(offsetS).toFixed(0)} s ${offsetS > 0 ? "after" : "before"} the time given; the camera clock can be off by at most a day. Check the date of the time given.`, [
      { field: "clockShownAt", message: "more than a day from the frame's capture time" },
    ]);
  }
  return offsetS;
}

// The range of exposure times Crownlight accepts. 1 microsecond is shorter than
// any mechanical or electronic shutter of the cameras members bring; an hour is
// longer than any exposure of an eclipse (totality lasts at most 7.5 minutes).
// Outside it the value is a corrupt or mistyped tag (EXIF has held 1e9 s, FITS
// 1e30 s), never a real exposure: it is not used, and the frame waits for the
// photographer to give the exposure.
export const MIN_EXPOSURE_S = 1e-6;
export const MAX_EXPOSURE_S = 3600;

export function isPlausibleExposure(seconds: number): boolean {
  return Number.isFinite(seconds) && seconds >= MIN_EXPOSURE_S && seconds <= MAX_EXPOSURE_S;
}

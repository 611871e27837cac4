// Limits of a moving site's track file, shared by the form (checked before
// sending) and the server (checked again, with the field named).

export const MAX_TRACK_POINTS = 200_000;

/**
 * Characters a track file may have: about 100 per GPX point at the point
 * limit. The parse is linear in the length, so a track at the limit is read in
 * bounded time on the request (about a second here; see the README).
 */
export const MAX_TRACK_CHARS = 20 * 1024 ** 2;

/** The limit as people read it. */
export const MAX_TRACK_LABEL = "20 MB";

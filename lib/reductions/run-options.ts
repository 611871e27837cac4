// Which alignments a set's frames allow, said before a run rather than after it
// fails. Aligning on the Sun's centre needs every frame's capture time (the
// ephemeris gives the Moon-minus-Sun offset at each instant) and the site; the
// corona and the Moon's limb need neither. Client-safe: the page and the start
// form show the same reasons the server refuses with.
import type { RegistrationModeInput } from "./schemas";

export interface RunFrame {
  fileName: string;
  /** The frame has a capture time (its file's or one the photographer gave). */
  hasTime: boolean;
}

export interface RunChoice {
  isOffered: boolean;
  /** Why it is not offered, or what the run will lack; null when nothing needs saying. */
  note: string | null;
}

/** Names a few frames and counts the rest. */
function listNames(names: string[], shown = 4): string {
  return names.length <= shown ? names.join(", ") : `${names.slice(0, shown).join(", ")} and ${names.length - shown} more`;
}

export function assessRunChoices(frames: RunFrame[], hasSite: boolean): Record<RegistrationModeInput, RunChoice> {
  const untimed = frames.filter((f) => !f.hasTime).map((f) => f.fileName);
  const noTimes = untimed.length > 0;
  const sunNote = !hasSite
    ? "Aligning on the Sun's centre needs the set's site."
    : noTimes
      ? `Aligning on the Sun's centre needs every frame's capture time; ${untimed.length} of ${frames.length} frames have none (${listNames(untimed)}). Give their times under “Capture times and exposures”, or align on the corona or the Moon's limb.`
      : null;
  const skyNote = hasSite && noTimes ? "Without every frame's capture time the result cannot be placed on the sky: it will have no sky coordinates (no WCS), and north stays unknown." : null;
  return {
    sun: { isOffered: sunNote === null, note: sunNote },
    corona: { isOffered: true, note: skyNote },
    moon: { isOffered: true, note: skyNote },
  };
}

/** The server's refusal when a run is asked for that the frames do not allow; null when it is allowed. */
export function refuseRunChoice(mode: RegistrationModeInput, frames: RunFrame[], hasSite: boolean): string | null {
  const choice = assessRunChoices(frames, hasSite)[mode];
  return choice.isOffered ? null : choice.note;
}

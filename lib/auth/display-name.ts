// What a person may call themselves. The name is shown to curators, in credits
// and at the top of e-mails the society sends, so it must not carry a message
// of its own: a short length, no control or direction-changing characters
// (which can reorder what is shown), and no web address.

export const DISPLAY_NAME_MAX = 80;
export const DISPLAY_NAME_MIN = 2;

// C0 and C1 controls, and the bidirectional embedding, override and isolate marks.
const CONTROL_RE = /[\u0000-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/u;
// A scheme, "www.", or a dotted host such as evil.example or mail.example.org.
const URL_RE = /[a-z][a-z0-9+.-]*:\/\/|www\.|[\p{L}\p{N}-]{2,}\.[\p{L}]{2,}/iu;

/** Why a name is refused, in words for the person typing it; null when it is fine. */
export function displayNameProblem(raw: unknown): string | null {
  if (typeof raw !== "string") return "Enter your name.";
  const name = raw.trim();
  if (name.length < DISPLAY_NAME_MIN) return `Enter your name (at least ${DISPLAY_NAME_MIN} characters).`;
  if ([...name].length > DISPLAY_NAME_MAX) return `A name can have at most ${DISPLAY_NAME_MAX} characters.`;
  if (CONTROL_RE.test(name)) return "A name cannot contain line breaks, tabs or other control characters.";
  if (name.includes("@")) return "A name cannot contain an e-mail address.";
  if (URL_RE.test(name)) return "A name cannot contain a web address (such as example.org).";
  return null;
}

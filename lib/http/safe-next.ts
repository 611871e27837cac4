// Where to go after signing in (?next=...): only a path on this site. Browsers
// read "\" as "/", drop tabs and newlines inside URLs, and some servers decode
// %2F and %5C before routing, so each of these could turn "/..." into
// "//evil.example": none of them is accepted, in plain or percent-encoded form.
const BASE = "http://app.invalid";
const MAX_LENGTH = 2000;

function isPlainPath(s: string): boolean {
  if (!s.startsWith("/") || s.startsWith("//")) return false;
  // Backslashes, and control characters (tab, CR, LF, ...), which browsers drop.
  return !/[\\\u0000-\u001f\u007f]/.test(s);
}

/** The path to follow, or `fallback` when `next` is not a plain path on this site. */
export function safeNextPath(next: unknown, fallback = "/"): string {
  if (typeof next !== "string" || next.length === 0 || next.length > MAX_LENGTH) return fallback;
  // Every decoding of the text must itself be a plain path: "%2F%2F", "/%5C",
  // "/%252F%252F" (encoded twice) and "/%09/" are refused with the plain forms.
  let text = next;
  for (let i = 0; i < 3; i++) {
    if (!isPlainPath(text)) return fallback;
    let decoded: string;
    try {
      decoded = decodeURIComponent(text);
    } catch {
      break; // a stray "%" (such as "?q=50%" once decoded) hides no further path
    }
    if (decoded === text) break;
    if (i === 2) return fallback; // still encoded after three rounds: not a path people write
    text = decoded;
  }
  const url = new URL(next, BASE);
  if (url.origin !== BASE) return fallback;
  // Dot segments resolve away ("/.//x" becomes "//x"): check what is returned too.
  const path = url.pathname + url.search + url.hash;
  return isPlainPath(url.pathname) ? path : fallback;
}

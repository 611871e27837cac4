// The society's one way of writing dates and times, client-safe. Dates are
// written in the society's locale with the month in words (never 02/08 or
// 08/02, which readers in different countries take differently); a time of day
// is always given in UTC and says so, since observers, curators and editors
// sit in different time zones and eclipse circumstances are given in UTC.

/** The society's locale (Kestrel Ridge writes British English). */
export const SOCIETY_LOCALE = "en-GB";

type When = string | Date | number;

const toDate = (when: When) => (when instanceof Date ? when : new Date(when));
const cache = new Map<string, Intl.DateTimeFormat>();

function formatter(locale: string, options: Intl.DateTimeFormatOptions): Intl.DateTimeFormat {
  const key = `${locale} ${JSON.stringify(options)}`;
  let f = cache.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat(locale, { timeZone: "UTC", ...options });
    cache.set(key, f);
  }
  return f;
}

function valid(when: When | null | undefined): Date | null {
  if (when === null || when === undefined || when === "") return null;
  const d = toDate(when);
  return Number.isNaN(d.getTime()) ? null : d;
}

/** "2 Aug 2027": a calendar date, read in UTC (a YYYY-MM-DD date stays that day). */
export function formatDate(when: When | null | undefined, locale = SOCIETY_LOCALE): string {
  const d = valid(when);
  return d ? formatter(locale, { day: "numeric", month: "short", year: "numeric" }).format(d) : "";
}

/** "2 Aug 2027, 10:05 UTC", or with seconds "2 Aug 2027, 10:05:12 UTC" where the second matters. */
export function formatDateTime(when: When | null | undefined, options: { seconds?: boolean; locale?: string } = {}): string {
  const d = valid(when);
  if (!d) return "";
  const locale = options.locale ?? SOCIETY_LOCALE;
  const date = formatter(locale, { day: "numeric", month: "short", year: "numeric" }).format(d);
  const time = formatter(locale, { hour: "2-digit", minute: "2-digit", ...(options.seconds ? { second: "2-digit" } : {}), hourCycle: "h23" }).format(d);
  return `${date}, ${time} UTC`;
}

/** "10:05:12 UTC": a time of day in UTC, for rows that share one date. */
export function formatTimeUtc(when: When | null | undefined, options: { seconds?: boolean; locale?: string } = {}): string {
  const d = valid(when);
  if (!d) return "";
  const time = formatter(options.locale ?? SOCIETY_LOCALE, { hour: "2-digit", minute: "2-digit", ...(options.seconds === false ? {} : { second: "2-digit" }), hourCycle: "h23" }).format(d);
  return `${time} UTC`;
}

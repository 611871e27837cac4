// Why a reduction failed, in words for the photographer. The runner's messages
// are written for its command line as well and may name its options; what the
// page and the mail show is said here, from the error's code, with the runner's
// details (file names, measured figures) kept where they name no option.
import { ReductionInputError, type ReductionInputCode } from "@/lib/reduction-runner/errors";

/** Command-line wording the runner uses, and what a person on the web reads instead. */
const OPTION_WORDS: [RegExp, string][] = [
  [/\(camera time with --clock-offset applied\)/g, "(camera time with the set's clock offset applied)"],
  [/\(the kit's mount, or --north-angle on the command line\)/g, "(the kit's mount, or the north angle on the bracket set's page)"],
  [/the helioprojective WCS \(--site\)/g, "placing the result on the sky"],
  [/--register sun/g, "alignment on the Sun's centre"],
  [/--clock-offset/g, "the camera clock offset"],
  [/--north-angle/g, "the north angle"],
  [/--site-file/g, "the site's track"],
  [/--site/g, "the site"],
];
const ANY_OPTION = /(^|[\s("'])--[a-z][a-z-]*/i;

/** What to do next, by the runner's code. */
const NEXT_STEP: Partial<Record<ReductionInputCode, string>> = {
  "missing-capture-time":
    "Give their times on the bracket set's page (from a CSV, from the first frame's time and the interval, or in the frame table), or align the frames on the corona or the Moon's limb, which need no times.",
  "orientation-unknown":
    "Choose the set's kit with the mount the camera stood on, or give the north angle on the bracket set's page; or align the frames on the corona, which needs no orientation.",
  "no-eclipse": "Check the frames' capture times, the camera clock offset and the set's site.",
  "bad-site": "Check the set's site on its page.",
  "bad-option": "Start the reduction again from the bracket set's page; if it fails again, tell the society's administrators.",
};

/** The runner's text with its options said in words; clauses that still name an option are left out. */
export function rewordRunnerMessage(message: string): string {
  let text = message;
  for (const [pattern, words] of OPTION_WORDS) text = text.replace(pattern, words);
  if (!ANY_OPTION.test(text)) return text;
  return text
    .split(/;\s+/)
    .filter((clause) => !ANY_OPTION.test(clause))
    .join("; ");
}

function sentence(text: string): string {
  const t = text.trim();
  if (!t) return "";
  const first = t[0].toUpperCase() + t.slice(1);
  return /[.!?]$/.test(first) ? first : `${first}.`;
}

/** The frames a missing-time message names ("a.fits, b.fits: no capture time ..."), if it names them. */
function namesWithoutTime(message: string): string | null {
  const m = /^(.+?): no capture time/.exec(message);
  return m ? m[1] : null;
}

/** The reason a person reads for a reduction that failed on its input. */
export function describeReductionFailure(err: unknown): string {
  const message = err instanceof Error ? err.message : String(err);
  if (!(err instanceof ReductionInputError)) return sentence(rewordRunnerMessage(message));
  if (err.code === "missing-capture-time") {
    const names = namesWithoutTime(message);
    return `${names ? `These frames have no capture time: ${names}.` : "Some frames have no capture time."} ${NEXT_STEP["missing-capture-time"]}`;
  }
  if (err.code === "bad-option") return `The reduction's settings were not accepted. ${NEXT_STEP["bad-option"]}`;
  const detail = sentence(rewordRunnerMessage(message));
  const next = NEXT_STEP[err.code];
  return next ? `${detail} ${next}`.trim() : detail;
}

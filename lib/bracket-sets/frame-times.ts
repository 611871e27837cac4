// Capture times and exposures the photographer gives for many frames at once:
// a CSV matched by file name, or a first time and an interval in shot order.
// Times are as the camera's clock showed them; the set's clock offset applies to
// them exactly as to times read from the files. Pure and client-safe: the
// service checks and stores, the tests call these directly.
import { splitCsvRecord } from "@/lib/csv-record";
import { parseExposure } from "./exposure-text";

/** One fault of the CSV, at a line (1-based, as an editor shows it) and a column when one is at fault. */
export interface CsvProblem {
  line: number;
  column: string | null;
  message: string;
}

export interface TimesCsvRow {
  line: number;
  fileName: string;
  /** UTC ms as the camera clock showed it; undefined when the cell is empty. */
  captureMs?: number;
  exposureS?: number;
}

export const TIMES_CSV_COLUMNS = { file: "file", time: "capture_time", exposure: "exposure_s" } as const;
/** The most problems listed in one refusal: past that, fixing the first ones usually fixes the rest. */
export const MAX_CSV_PROBLEMS = 12;
/** Interval limits for times in shot order: a bracket frame every few milliseconds to one an hour. */
export const MIN_INTERVAL_S = 0.001;
export const MAX_INTERVAL_S = 3600;

const ISO_WITH_ZONE = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2}):(\d{2})(\.\d{1,6})?(Z|[+-]\d{2}:?\d{2})$/i;
const ISO_WITHOUT_ZONE = /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d+)?)?$/;
const TIME_OF_DAY = /^(\d{1,2}):(\d{2}):(\d{2})(\.\d{1,6})?$/;

function checkClockFields(h: number, mi: number, s: number): string | null {
  if (h > 23) return `hour ${h} is past 23`;
  if (mi > 59) return `minute ${mi} is past 59`;
  // 60 is a leap second; the camera clock never shows one, and neither does Date.
  if (s > 59) return `second ${s} is past 59`;
  return null;
}

/**
 * A time as the camera clock showed it, to UTC ms. Takes an ISO 8601 date and
 * time with its zone (2027-08-02T10:04:31.25Z, 2027-08-02T12:04:31+02:00), or,
 * when `dayUtc` (YYYY-MM-DD, the eclipse's date) is given, a time of day in UTC
 * (10:04:31.25). Returns the reason in words when the text is not such a time.
 */
export function parseCameraTime(text: string, dayUtc?: string): { ms: number } | { problem: string } {
  const t = text.trim();
  if (t === "") return { problem: "is empty" };
  const iso = ISO_WITH_ZONE.exec(t);
  if (iso) {
    const [, y, mo, d, h, mi, s] = iso.map(Number);
    const fault = checkClockFields(h, mi, s);
    if (fault) return { problem: `"${t}": ${fault}` };
    const day = new Date(Date.UTC(y, mo - 1, d));
    if (day.getUTCMonth() !== mo - 1 || day.getUTCDate() !== d) return { problem: `"${t}": ${iso[1]}-${iso[2]}-${iso[3]} is not a date` };
    const ms = Date.parse(t.replace(" ", "T").replace(/([+-]\d{2})(\d{2})$/, "$1:$2"));
    return Number.isFinite(ms) ? { ms } : { problem: `"${t}" is not a time` };
  }
  if (ISO_WITHOUT_ZONE.test(t)) return { problem: `"${t}" has no time zone; end it with Z for UTC or with the camera's offset, such as +02:00` };
  const tod = TIME_OF_DAY.exec(t);
  if (tod && dayUtc) {
    const [h, mi, s] = [Number(tod[1]), Number(tod[2]), Number(tod[3])];
    const fault = checkClockFields(h, mi, s);
    if (fault) return { problem: `"${t}": ${fault}` };
    const ms = Date.parse(`${dayUtc}T${tod[1].padStart(2, "0")}:${tod[2]}:${tod[3]}${tod[4] ?? ""}Z`);
    return Number.isFinite(ms) ? { ms } : { problem: `"${t}" is not a time` };
  }
  return {
    problem: dayUtc
      ? `"${t}" is not a time; write it as 10:04:31.25 (UTC on ${dayUtc}) or 2027-08-02T10:04:31.25Z`
      : `"${t}" is not a time; write it as 2027-08-02T10:04:31.25Z, or with the camera's offset as 2027-08-02T12:04:31.25+02:00`,
  };
}

/** The name without folders: a camera's list may carry paths. */
function baseName(path: string): string {
  return path.split(/[\\/]/).pop() ?? path;
}

/**
 * Reads a times CSV: a header row naming `file` and at least one of
 * `capture_time` and `exposure_s` (any order, other columns ignored; comma,
 * semicolon or tab between fields). An empty cell leaves that value as it is.
 * Every bad row is named with its line and column. The rows come back with the
 * problems so a caller can check their names too; use them only when there is none.
 */
export function parseTimesCsv(text: string, dayUtc?: string): { rows: TimesCsvRow[]; problems: CsvProblem[] } {
  const lines = text.replace(/^\uFEFF/, "").split(/\r\n|\n|\r/);
  const problems: CsvProblem[] = [];
  const add = (line: number, column: string | null, message: string) => {
    if (problems.length < MAX_CSV_PROBLEMS) problems.push({ line, column, message });
  };
  const headerAt = lines.findIndex((l) => l.trim() !== "");
  if (headerAt < 0) return { rows: [], problems: [{ line: 1, column: null, message: "the file is empty; it needs a header row with file and capture_time or exposure_s" }] };
  const header = (splitCsvRecord(lines[headerAt]) ?? []).map((h) => h.toLowerCase());
  const col = { file: header.indexOf(TIMES_CSV_COLUMNS.file), time: header.indexOf(TIMES_CSV_COLUMNS.time), exposure: header.indexOf(TIMES_CSV_COLUMNS.exposure) };
  if (col.file < 0 || (col.time < 0 && col.exposure < 0)) {
    const found = header.filter(Boolean).map((h) => `"${h}"`).join(", ") || "nothing";
    return { rows: [], problems: [{ line: headerAt + 1, column: null, message: `the header row needs the column file and at least one of capture_time and exposure_s; found ${found}` }] };
  }
  const rows: TimesCsvRow[] = [];
  const firstLineOf = new Map<string, number>();
  for (let i = headerAt + 1; i < lines.length; i++) {
    if (lines[i].trim() === "") continue;
    const line = i + 1;
    const fields = splitCsvRecord(lines[i]);
    if (!fields) {
      add(line, null, "a quoted field is not closed");
      continue;
    }
    const fileName = baseName(fields[col.file] ?? "");
    if (!fileName) {
      add(line, TIMES_CSV_COLUMNS.file, "is empty");
      continue;
    }
    const seen = firstLineOf.get(fileName.toLowerCase());
    if (seen !== undefined) add(line, TIMES_CSV_COLUMNS.file, `${fileName} is listed again (first on line ${seen})`);
    else firstLineOf.set(fileName.toLowerCase(), line);
    const row: TimesCsvRow = { line, fileName };
    const timeText = col.time >= 0 ? (fields[col.time] ?? "") : "";
    if (timeText !== "") {
      const parsed = parseCameraTime(timeText, dayUtc);
      if ("problem" in parsed) add(line, TIMES_CSV_COLUMNS.time, parsed.problem);
      else row.captureMs = parsed.ms;
    }
    const exposureText = col.exposure >= 0 ? (fields[col.exposure] ?? "") : "";
    if (exposureText !== "") {
      const s = parseExposure(exposureText);
      if (s === null) add(line, TIMES_CSV_COLUMNS.exposure, `"${exposureText}" is not a positive number of seconds; write 0.004 or 1/250`);
      else if (s > MAX_INTERVAL_S) add(line, TIMES_CSV_COLUMNS.exposure, `${exposureText} s is more than an hour`);
      else row.exposureS = s;
    }
    if (row.captureMs === undefined && row.exposureS === undefined && timeText === "" && exposureText === "") add(line, null, `gives neither a capture time nor an exposure for ${fileName}`);
    rows.push(row);
  }
  if (rows.length === 0 && problems.length === 0) add(headerAt + 1, null, "the file has a header row but no frames under it");
  return { rows, problems };
}

/** "line 4, column capture_time: ..." for each problem: what the photographer reads. */
export function describeCsvProblems(fileName: string, problems: CsvProblem[]): string {
  const parts = problems.map((p) => `line ${p.line}${p.column ? `, column ${p.column}` : ""}: ${p.message}`);
  return `${fileName} was not used, nothing was changed. ${parts.join("; ")}${problems.length >= MAX_CSV_PROBLEMS ? "; and perhaps more" : ""}.`;
}

/** Compares file names as a camera numbers them: IMG_9.CR2 before IMG_10.CR2. */
export function compareShotOrder(a: string, b: string): number {
  return a.localeCompare(b, "en", { numeric: true, sensitivity: "base" }) || (a < b ? -1 : a > b ? 1 : 0);
}

/**
 * Times in shot order: the frames sorted by file name as the camera numbered
 * them, the first at `firstMs`, each next one `intervalS` later (start to start).
 */
export function assignIntervalTimes<T extends { fileName: string }>(items: readonly T[], firstMs: number, intervalS: number): { item: T; captureMs: number }[] {
  if (!(Number.isFinite(intervalS) && intervalS >= MIN_INTERVAL_S && intervalS <= MAX_INTERVAL_S)) {
    throw new RangeError(`interval ${intervalS} s is outside ${MIN_INTERVAL_S} to ${MAX_INTERVAL_S} s`);
  }
  return [...items]
    .sort((a, b) => compareShotOrder(a.fileName, b.fileName))
    // Whole milliseconds, as stored: i * interval computed once per frame, so errors do not add up.
    .map((item, i) => ({ item, captureMs: firstMs + Math.round(i * intervalS * 1000) }));
}

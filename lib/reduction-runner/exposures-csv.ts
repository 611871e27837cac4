// The photographer's exposure list: a CSV with a header row and the columns
// `file` (matched by file name, without folders) and `exposure_s` (seconds, as a
// decimal like 0.004 or a shutter fraction like 1/250). Other columns are
// ignored. Fields may be quoted as RFC 4180 says. Every fault names the line.
import { readFile } from "node:fs/promises";
import { basename } from "node:path";
import { splitCsvRecord } from "@/lib/csv-record";
import { ReductionInputError } from "./errors";
import { parseStrictNumber } from "@/lib/strict-number";

/** Splits one CSV record (lib/csv-record.ts), naming the line when a quote is left open. */
function splitCsvLine(line: string, where: string): string[] {
  const fields = splitCsvRecord(line);
  if (!fields) throw new ReductionInputError("bad-exposures-csv", `${where}: a quoted field is not closed`);
  return fields;
}

/** Seconds from "0.004", "4e-3" or "1/250"; NaN when the text is neither. */
export function parseExposureText(text: string): number {
  const fraction = /^(\d+(?:\.\d+)?)\s*\/\s*(\d+(?:\.\d+)?)$/.exec(text);
  if (fraction) return Number(fraction[1]) / Number(fraction[2]);
  return parseStrictNumber(text);
}

/** File name -> exposure in seconds. `csvName` names the CSV in messages. */
export function parseExposuresCsv(text: string, csvName: string): Map<string, number> {
  const lines = text.replace(/^\uFEFF/, "").split(/\r?\n/);
  const headerIndex = lines.findIndex((l) => l.trim() !== "");
  if (headerIndex < 0) throw new ReductionInputError("bad-exposures-csv", `${csvName}: the file is empty; it needs a header row with the columns file and exposure_s`);
  const header = splitCsvLine(lines[headerIndex], `${csvName} line ${headerIndex + 1}`).map((h) => h.toLowerCase());
  const fileColumn = header.indexOf("file");
  const exposureColumn = header.indexOf("exposure_s");
  if (fileColumn < 0 || exposureColumn < 0) {
    throw new ReductionInputError("bad-exposures-csv", `${csvName} line ${headerIndex + 1}: the header row needs the columns file and exposure_s, found ${header.map((h) => `"${h}"`).join(", ")}`);
  }
  const exposures = new Map<string, number>();
  const firstLine = new Map<string, number>();
  for (let i = headerIndex + 1; i < lines.length; i++) {
    if (lines[i].trim() === "") continue;
    const where = `${csvName} line ${i + 1}`;
    const fields = splitCsvLine(lines[i], where);
    if (fields.length !== header.length) {
      throw new ReductionInputError("bad-exposures-csv", `${where}: ${fields.length} fields, but the header row has ${header.length}`);
    }
    const file = basename(fields[fileColumn]);
    if (!file) throw new ReductionInputError("bad-exposures-csv", `${where}: the file column is empty`);
    const exposureS = parseExposureText(fields[exposureColumn]);
    if (!(Number.isFinite(exposureS) && exposureS > 0)) {
      throw new ReductionInputError("bad-exposures-csv", `${where}: exposure_s "${fields[exposureColumn]}" is not a positive number of seconds (write 0.004 or 1/250)`);
    }
    if (firstLine.has(file)) {
      throw new ReductionInputError("bad-exposures-csv", `${where}: ${file} is listed again (first on line ${firstLine.get(file)})`);
    }
    firstLine.set(file, i + 1);
    exposures.set(file, exposureS);
  }
  return exposures;
}

export async function readExposuresCsv(path: string): Promise<Map<string, number>> {
  const name = basename(path);
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (error) {
    throw new ReductionInputError("bad-exposures-csv", `${name}: cannot read the exposures file (${(error as NodeJS.ErrnoException).code ?? "read error"})`, { cause: error });
  }
  return parseExposuresCsv(text, name);
}

/** Refuses overrides for files that are not in the bracket: a typo would otherwise go unnoticed. */
export function checkOverridesMatchFiles(overrides: Map<string, number>, files: string[], csvName = "exposures"): void {
  const names = new Set(files.map((f) => basename(f)));
  for (const file of overrides.keys()) {
    if (!names.has(file)) throw new ReductionInputError("bad-exposures-csv", `${csvName}: ${file} is not among the ${names.size} frames given (is the name mistyped?)`);
  }
}

// One CSV record split into fields, for the photographers' lists (capture times, exposures):
// RFC 4180 quoting, fields separated by commas, semicolons or tabs (spreadsheets write all three).

/** Splits one CSV record (RFC 4180 quoting, no line breaks inside quotes); null when a quote is left open. */
export function splitCsvRecord(line: string): string[] | null {
  const fields: string[] = [];
  let field = "";
  let isQuoted = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (isQuoted) {
      if (ch === '"' && line[i + 1] === '"') {
        field += '"';
        i++;
      } else if (ch === '"') isQuoted = false;
      else field += ch;
    } else if (ch === '"' && field.trim() === "") {
      isQuoted = true;
      field = "";
    } else if (ch === "," || ch === ";" || ch === "\t") {
      fields.push(field.trim());
      field = "";
    } else field += ch;
  }
  if (isQuoted) return null;
  fields.push(field.trim());
  return fields;
}

// The captions file and the credits file of a print bundle, in the society's
// house style: plates numbered in print order; a caption is the title in
// bold-free plain text, a full stop, the caption, then the credit line in
// brackets; credits list who took the data and who processed it, the
// society, the licence and the file names, one plate to a paragraph. Plain
// UTF-8 text that any layout program places without surprises. Pure.
export interface HouseStyleEntry {
  position: number;
  slotLabel: string;
  title: string;
  caption: string;
  creditLine: string;
  acquiredBy: string;
  processedBy: string;
  licenceName: string;
  licenceUri: string;
  files: string[];
}

export interface HouseStyleEdition {
  title: string;
  issueLabel: string;
  societyName: string;
  embargoDate: string | null;
}

function heading(e: HouseStyleEdition, what: string): string[] {
  const name = `${e.title}${e.issueLabel ? `, ${e.issueLabel}` : ""}`;
  const lines = [`${e.societyName}: ${name}`, what];
  if (e.embargoDate) lines.push(`Embargoed until ${e.embargoDate}: nothing here may appear elsewhere before that day.`);
  return [...lines, ""];
}

const sentence = (s: string) => {
  const t = s.trim().replace(/\s+/g, " ");
  return t === "" || /[.!?]$/.test(t) ? t : `${t}.`;
};

export function buildCaptionsText(edition: HouseStyleEdition, entries: HouseStyleEntry[]): string {
  const out = heading(edition, "Captions, in print order");
  for (const e of entries) {
    out.push(`Plate ${e.position} (${e.slotLabel})`);
    out.push([sentence(e.title), sentence(e.caption), `(${e.creditLine.trim()})`].filter(Boolean).join(" "));
    out.push("");
  }
  return out.join("\n");
}

export function buildCreditsText(edition: HouseStyleEdition, entries: HouseStyleEntry[]): string {
  const out = heading(edition, "Credits, in print order");
  for (const e of entries) {
    out.push(`Plate ${e.position}: ${e.title}`);
    out.push(`Data: ${e.acquiredBy}. Processing: ${e.processedBy}. ${edition.societyName}.`);
    out.push(`Licence: ${e.licenceName} (${e.licenceUri}).`);
    out.push(`Credit line: ${e.creditLine.trim()}`);
    out.push(`Files: ${e.files.join(", ")}`);
    out.push("");
  }
  return out.join("\n");
}

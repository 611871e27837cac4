// The proof of a print bundle: a PDF with one page per plate, in print order,
// the plate drawn at its printed size with its slot, pixel size, files,
// caption and credit beneath. Each page's ArtBox is exactly the image's
// rectangle, so its printed size can be read back (and is, by the tests). A
// screen slot has no printed size: its image is drawn to fit the text width
// and the page says so. Text is set in Inter, shipped with the app, so any
// name prints (the standard PDF fonts cover Latin-1 only). Embedded whole:
// fontkit's subsetting of this TTF drops most glyphs (seen here, pdf-lib 1.17.1).
import { readFile } from "node:fs/promises";
import { createRequire } from "node:module";
import fontkit from "@pdf-lib/fontkit";
import { PDFDocument, rgb, type PDFFont, type PDFPage } from "pdf-lib";
import { MM_PER_INCH } from "../print-sizes";

export const PT_PER_MM = 72 / MM_PER_INCH;
const A4 = { widthMm: 210, heightMm: 297 };
const MARGIN_MM = 15;
const SCREEN_WIDTH_MM = 150;

export interface ProofPage {
  position: number;
  title: string;
  slotLabel: string;
  caption: string;
  creditLine: string;
  files: string[];
  jpeg: Buffer;
  widthPx: number;
  heightPx: number;
  /** Printed width in mm; null for a screen slot. */
  widthMm: number | null;
  dpi: number | null;
  notes: string[];
}

export interface ProofEdition {
  title: string;
  issueLabel: string;
  societyName: string;
  embargoDate: string | null;
  createdAt: string;
}

function fontPath(weight: "400Regular" | "600SemiBold"): string {
  const require = createRequire(`${process.cwd()}/package.json`);
  return require.resolve(`@expo-google-fonts/inter/${weight}/Inter_${weight}.ttf`);
}

function wrap(text: string, font: PDFFont, size: number, widthPt: number): string[] {
  const lines: string[] = [];
  for (const para of text.split(/\n+/)) {
    let line = "";
    for (const word of para.split(/\s+/).filter(Boolean)) {
      const next = line ? `${line} ${word}` : word;
      if (font.widthOfTextAtSize(next, size) <= widthPt || !line) line = next;
      else {
        lines.push(line);
        line = word;
      }
    }
    if (line) lines.push(line);
  }
  return lines;
}

/** The image's printed size in mm: its slot width, height by aspect; a screen slot fits the text width. */
export function printedSizeMm(p: Pick<ProofPage, "widthPx" | "heightPx" | "widthMm">): { widthMm: number; heightMm: number } {
  const widthMm = p.widthMm ?? SCREEN_WIDTH_MM;
  return { widthMm, heightMm: (widthMm * p.heightPx) / p.widthPx };
}

export async function buildProofPdf(edition: ProofEdition, pages: ProofPage[]): Promise<Buffer> {
  const doc = await PDFDocument.create();
  doc.registerFontkit(fontkit);
  const regular = await doc.embedFont(await readFile(fontPath("400Regular")), { subset: false });
  const bold = await doc.embedFont(await readFile(fontPath("600SemiBold")), { subset: false });
  const name = `${edition.title}${edition.issueLabel ? `, ${edition.issueLabel}` : ""}`;
  doc.setTitle(`Proof: ${name}`);
  doc.setAuthor(edition.societyName);
  doc.setCreator("Crownlight editions");
  doc.setSubject(`Print proof, ${pages.length} plate${pages.length === 1 ? "" : "s"}`);

  for (const p of pages) {
    const img = printedSizeMm(p);
    const pageWidthMm = Math.max(A4.widthMm, img.widthMm + 2 * MARGIN_MM);
    const textWidthPt = (pageWidthMm - 2 * MARGIN_MM) * PT_PER_MM;
    const header = [`Plate ${p.position}: ${p.title}`];
    const facts = [
      p.widthMm
        ? `${p.slotLabel}. Printed ${p.widthMm} mm x ${img.heightMm.toFixed(1)} mm; file ${p.widthPx} x ${p.heightPx} px at ${p.dpi} dpi.`
        : `${p.slotLabel}. Screen slot, ${p.widthPx} x ${p.heightPx} px; drawn ${img.widthMm} mm wide here, not a printed size.`,
      `Files: ${p.files.join(", ")}`,
      ...p.notes.map((n) => `Note: ${n}`),
    ];
    const captionLines = wrap(p.caption || p.title, regular, 10, textWidthPt);
    const creditLines = wrap(p.creditLine, regular, 8.5, textWidthPt);
    const factLines = facts.flatMap((f) => wrap(f, regular, 8.5, textWidthPt));
    const textMm = 8 + (captionLines.length * 13 + (creditLines.length + factLines.length) * 11 + 20) / PT_PER_MM;
    const pageHeightMm = Math.max(A4.heightMm, MARGIN_MM * 2 + 10 + img.heightMm + textMm);
    const page: PDFPage = doc.addPage([pageWidthMm * PT_PER_MM, pageHeightMm * PT_PER_MM]);
    const H = page.getHeight();
    let y = H - MARGIN_MM * PT_PER_MM;
    page.drawText(header[0], { x: MARGIN_MM * PT_PER_MM, y: y - 12, size: 12, font: bold, color: rgb(0, 0, 0) });
    page.drawText(`Proof of ${name}, ${edition.societyName}${edition.embargoDate ? `, embargoed until ${edition.embargoDate}` : ""}`, {
      x: MARGIN_MM * PT_PER_MM,
      y: y - 24,
      size: 8,
      font: regular,
      color: rgb(0.3, 0.3, 0.3),
    });
    y -= 10 * PT_PER_MM;
    const image = await doc.embedJpg(p.jpeg);
    const w = img.widthMm * PT_PER_MM;
    const h = img.heightMm * PT_PER_MM;
    const x = MARGIN_MM * PT_PER_MM;
    y -= h;
    page.drawImage(image, { x, y, width: w, height: h });
    page.setArtBox(x, y, w, h);
    y -= 8 * PT_PER_MM;
    for (const l of captionLines) {
      page.drawText(l, { x, y, size: 10, font: regular, lineHeight: 13 });
      y -= 13;
    }
    y -= 4;
    for (const l of creditLines) {
      page.drawText(l, { x, y, size: 8.5, font: bold });
      y -= 11;
    }
    y -= 6;
    for (const l of factLines) {
      page.drawText(l, { x, y, size: 8.5, font: regular, color: rgb(0.25, 0.25, 0.25) });
      y -= 11;
    }
  }
  return Buffer.from(await doc.save());
}

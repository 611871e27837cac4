// The proof of a print bundle: a PDF with one page per plate, in print order,
// the plate drawn at its printed size with its slot, pixel size, files,
// caption and credit beneath. Each page's ArtBox is exactly the image's
// rectangle, so its printed size can be read back (and is, by the tests). A
// screen slot has no printed size: its image is drawn to fit the text width
// and the page says so. Every page has one size: A4, or the largest a plate
// needs, and then each page says which plate set it. A note (a resolution too
// low for the slot) is boxed in red above the image. Text is set in Inter, shipped with the app, so any
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

/** One page's parts, measured before anything is drawn. */
interface Measured {
  page: ProofPage;
  img: { widthMm: number; heightMm: number };
  captionLines: string[];
  creditLines: string[];
  factLines: string[];
  noteLines: string[];
  /** The page size this plate alone would need (A4 at least). */
  needMm: { width: number; height: number };
}

const NOTE_SIZE = 10;
const NOTE_LINE = 13;
const NOTE_PAD_PT = 6;
/** Room at the foot for the page-size line (up to three lines of 8 pt), when the common size is not A4. */
const SIZE_LINE_MM = 12;

/**
 * The one page size of the whole proof: A4, or larger when a plate's printed
 * size and its texts do not fit on A4. Every page then carries a line saying
 * which plate set the size, so no page differs without saying why.
 */
export function commonPageSizeMm(needs: { width: number; height: number }[]): { widthMm: number; heightMm: number } {
  return {
    widthMm: Math.max(A4.widthMm, ...needs.map((n) => n.width)),
    heightMm: Math.max(A4.heightMm, ...needs.map((n) => n.height)),
  };
}

function describePageSize(size: { widthMm: number; heightMm: number }, measured: Measured[]): string | null {
  if (size.widthMm === A4.widthMm && size.heightMm === A4.heightMm) return null;
  const setters = measured.filter((m) => m.needMm.width > A4.widthMm || m.needMm.height > A4.heightMm).map((m) => `plate ${m.page.position} (${m.page.slotLabel})`);
  return `Every page of this proof is ${Math.round(size.widthMm)} x ${Math.round(size.heightMm)} mm, larger than A4, so that ${setters.join(" and ")} can be drawn at ${setters.length === 1 ? "its" : "their"} printed size with ${setters.length === 1 ? "its" : "their"} texts.`;
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

  // First measure every page, then draw them all at the largest size any of them needs.
  const measured: Measured[] = pages.map((p) => {
    const img = printedSizeMm(p);
    const widthMm = Math.max(A4.widthMm, img.widthMm + 2 * MARGIN_MM);
    const textWidthPt = (widthMm - 2 * MARGIN_MM) * PT_PER_MM;
    const facts = [
      p.widthMm
        ? `${p.slotLabel}. Printed ${p.widthMm} mm x ${img.heightMm.toFixed(1)} mm; file ${p.widthPx} x ${p.heightPx} px at ${p.dpi} dpi.`
        : `${p.slotLabel}. Screen slot, ${p.widthPx} x ${p.heightPx} px; drawn ${img.widthMm} mm wide here, not a printed size.`,
      `Files: ${p.files.join(", ")}`,
    ];
    const captionLines = wrap(p.caption || p.title, regular, 10, textWidthPt);
    const creditLines = wrap(p.creditLine, regular, 8.5, textWidthPt);
    const factLines = facts.flatMap((f) => wrap(f, regular, 8.5, textWidthPt));
    const noteLines = p.notes.flatMap((n) => wrap(n, bold, NOTE_SIZE, textWidthPt - 2 * NOTE_PAD_PT));
    const notesMm = noteLines.length ? (noteLines.length * NOTE_LINE + 2 * NOTE_PAD_PT + 12) / PT_PER_MM + 4 : 0;
    const textMm = 8 + (captionLines.length * 13 + (creditLines.length + factLines.length) * 11 + 20) / PT_PER_MM;
    const heightMm = MARGIN_MM * 2 + 10 + notesMm + img.heightMm + textMm + SIZE_LINE_MM;
    return { page: p, img, captionLines, creditLines, factLines, noteLines, needMm: { width: widthMm, height: heightMm } };
  });
  const size = commonPageSizeMm(measured.map((m) => m.needMm));
  const sizeLine = describePageSize(size, measured);

  for (const m of measured) {
    const p = m.page;
    const page: PDFPage = doc.addPage([size.widthMm * PT_PER_MM, size.heightMm * PT_PER_MM]);
    const x = MARGIN_MM * PT_PER_MM;
    const textWidthPt = (size.widthMm - 2 * MARGIN_MM) * PT_PER_MM;
    let y = page.getHeight() - MARGIN_MM * PT_PER_MM;
    page.drawText(`Plate ${p.position}: ${p.title}`, { x, y: y - 12, size: 12, font: bold, color: rgb(0, 0, 0) });
    page.drawText(`Proof of ${name}, ${edition.societyName}${edition.embargoDate ? `, embargoed until ${edition.embargoDate}` : ""}`, {
      x,
      y: y - 24,
      size: 8,
      font: regular,
      color: rgb(0.3, 0.3, 0.3),
    });
    y -= 10 * PT_PER_MM;

    // A resolution warning goes above the image, boxed in red, where the eye lands first.
    if (m.noteLines.length) {
      const boxH = 12 + m.noteLines.length * NOTE_LINE + 2 * NOTE_PAD_PT;
      const red = rgb(0.72, 0.05, 0.05);
      page.drawRectangle({ x, y: y - boxH, width: textWidthPt, height: boxH, borderColor: red, borderWidth: 1.5, color: rgb(1, 0.94, 0.94) });
      let ny = y - NOTE_PAD_PT - 10;
      page.drawText(p.notes.length === 1 ? "Check before printing:" : "Check these before printing:", { x: x + NOTE_PAD_PT, y: ny, size: 9, font: bold, color: red });
      ny -= NOTE_LINE;
      for (const l of m.noteLines) {
        page.drawText(l, { x: x + NOTE_PAD_PT, y: ny, size: NOTE_SIZE, font: bold, color: red });
        ny -= NOTE_LINE;
      }
      y -= boxH + 4 * PT_PER_MM;
    }

    const image = await doc.embedJpg(p.jpeg);
    const w = m.img.widthMm * PT_PER_MM;
    const h = m.img.heightMm * PT_PER_MM;
    y -= h;
    page.drawImage(image, { x, y, width: w, height: h });
    page.setArtBox(x, y, w, h);
    y -= 8 * PT_PER_MM;
    for (const l of m.captionLines) {
      page.drawText(l, { x, y, size: 10, font: regular, lineHeight: 13 });
      y -= 13;
    }
    y -= 4;
    for (const l of m.creditLines) {
      page.drawText(l, { x, y, size: 8.5, font: bold });
      y -= 11;
    }
    y -= 6;
    for (const l of m.factLines) {
      page.drawText(l, { x, y, size: 8.5, font: regular, color: rgb(0.25, 0.25, 0.25) });
      y -= 11;
    }
    if (sizeLine) {
      // At the foot of the page, in the room kept for it (SIZE_LINE_MM).
      const lines = wrap(sizeLine, regular, 8, textWidthPt);
      lines.forEach((l, i) => page.drawText(l, { x, y: MARGIN_MM * PT_PER_MM + (lines.length - 1 - i) * 10, size: 8, font: regular, color: rgb(0.3, 0.3, 0.3) }));
    }
  }
  return Buffer.from(await doc.save());
}

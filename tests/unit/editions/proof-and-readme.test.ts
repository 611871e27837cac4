// The proof's pages share one size (A4, or the largest a plate needs, said on
// every page), the low-resolution note sits above the image; the printer's
// README names the CMYK profile in words and says how to have their own used.
import { PDFDocument } from "pdf-lib";
import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { buildProofPdf, commonPageSizeMm, PT_PER_MM, type ProofPage } from "@/lib/editions/export/proof";
import { buildPrinterReadme, describeCmykProfile, type ProfileFacts } from "@/lib/editions/export/printer-notes";

const jpeg = await sharp({ create: { width: 40, height: 30, channels: 3, background: "#333" } }).jpeg().toBuffer();
const page = (position: number, widthMm: number | null, notes: string[] = []): ProofPage => ({
  position,
  title: `Plate ${position}`,
  slotLabel: widthMm ? `${widthMm} mm at 300 dpi` : "Web, 2048 px wide",
  caption: "Streamers over Luxor; synthetic demo data.",
  creditLine: "Oskar Lindqvist / Kestrel Ridge AS, CC BY 4.0",
  files: [`0${position}_natural.tif`],
  jpeg,
  widthPx: 1039,
  heightPx: 779,
  widthMm,
  dpi: widthMm ? 300 : null,
  notes,
});
const edition = { title: "Corona Notes", issueLabel: "No. 41", societyName: "Kestrel Ridge Astronomical Society", embargoDate: null, createdAt: "2027-09-01T00:00:00Z" };

async function pageTexts(pdf: Buffer): Promise<{ sizes: [number, number][]; doc: PDFDocument }> {
  const doc = await PDFDocument.load(pdf);
  return { doc, sizes: doc.getPages().map((p) => [Math.round(p.getWidth() / PT_PER_MM), Math.round(p.getHeight() / PT_PER_MM)]) };
}

describe("the proof's page size", () => {
  it("is A4 when every plate fits, and otherwise the largest any plate needs", () => {
    expect(commonPageSizeMm([{ width: 150, height: 200 }])).toEqual({ widthMm: 210, heightMm: 297 });
    expect(commonPageSizeMm([{ width: 240, height: 280 }, { width: 210, height: 330 }])).toEqual({ widthMm: 240, heightMm: 330 });
  });

  it("gives every page the same size, A4 for column slots, larger for a cover", async () => {
    const a4 = await pageTexts(await buildProofPdf(edition, [page(1, 88), page(2, null), page(3, 120)]));
    expect(a4.sizes).toEqual([
      [210, 297],
      [210, 297],
      [210, 297],
    ]);
    // A 210 mm cover needs 240 mm with the margins (15 mm each side): every page takes that size.
    const big = await pageTexts(await buildProofPdf(edition, [page(1, 88), page(2, 210)]));
    expect(new Set(big.sizes.map((s) => s.join("x"))).size).toBe(1);
    expect(big.sizes[0][0]).toBe(240);
    // The first page is A4-sized content on a larger page: its printed image keeps its size all the same.
    expect(big.doc.getPages()[0].getArtBox().width / PT_PER_MM).toBeCloseTo(88, 2);
  });

  it("puts the low-resolution note above the image", async () => {
    const pdf = await buildProofPdf(edition, [page(1, 180, ["The slot asks for 2126 px at 300 dpi but the rendition has 1039 px; it prints at 146.6 dpi."])]);
    const doc = await PDFDocument.load(pdf);
    const p = doc.getPages()[0];
    const art = p.getArtBox();
    // The page's top margin holds the title (10 mm); the note box lies between it and the image's top edge.
    const imageTopMm = (p.getHeight() - (art.y + art.height)) / PT_PER_MM;
    expect(imageTopMm).toBeGreaterThan(15 + 10 + 8);
    const plain = await buildProofPdf(edition, [page(1, 180)]);
    const q = (await PDFDocument.load(plain)).getPages()[0];
    expect((q.getHeight() - (q.getArtBox().y + q.getArtBox().height)) / PT_PER_MM).toBeCloseTo(25, 0);
  });
});

// The facts ExifTool reads from libvips' built-in CMYK profile (checked in this worktree with ExifTool 13.50).
const CHEMICAL_PROOF: ProfileFacts = {
  description: "Chemical proof",
  copyright: "Created by Graeme W. Gill. Released into the public domain. No Warranty, Use at your own risk.",
  profileClass: "Output Device Profile",
  deviceAttributes: "Reflective, Glossy, Positive, Color",
  created: "2014:08:25 12:40:53",
};

describe("the printer's README", () => {
  it("names libvips' built-in profile and says it is a proofing profile, not a press", () => {
    const words = describeCmykProfile(CHEMICAL_PROOF, false);
    expect(words).toContain("“Chemical proof”");
    expect(words).toContain("built into the libvips image library");
    expect(words).toMatch(/glossy photographic proof print/);
    expect(words).toMatch(/not an offset or digital press/);
  });

  it("names a printer's own profile as theirs", () => {
    const words = describeCmykProfile({ ...CHEMICAL_PROOF, description: "Press 60 on matt paper", copyright: "Printer Ltd", deviceAttributes: "Reflective, Matte, Positive, Color" }, true);
    expect(words).toContain("“Press 60 on matt paper”");
    expect(words).toContain("the profile the society was given for this printing");
    expect(words).not.toContain("libvips");
  });

  it("lists the files, the warnings, the embargo and how to give the printer's own profile", () => {
    const text = buildPrinterReadme({
      editionName: "Corona Notes, No. 41",
      societyName: "Kestrel Ridge Astronomical Society",
      embargoDate: "2027-09-01",
      plateCount: 2,
      files: [
        { name: "01_natural.tif", kind: "tiff-srgb", position: 1 },
        { name: "01_natural_cmyk.tif", kind: "tiff-cmyk", position: 1 },
        { name: "proof.pdf", kind: "proof", position: null },
      ],
      cmyk: { facts: CHEMICAL_PROOF, custom: false },
      greyscale: false,
      warnings: ["Plate 2: it prints at 146.6 dpi."],
    });
    expect(text).toContain("EMBARGO: not to be published before 2027-09-01.");
    expect(text).toContain("CHECK BEFORE PRINTING\n- Plate 2: it prints at 146.6 dpi.");
    expect(text).toContain("- 01_natural_cmyk.tif: 8-bit CMYK TIFF");
    expect(text).toMatch(/USING YOUR OWN PROFILE\nTo have the CMYK files made with your press and paper profile, send the profile \(an \.icc or \.icm file\)/);
    // Written for a printer: no setting names.
    expect(text).not.toMatch(/EDITION_CMYK_ICC_PROFILE|--/);
  });
});

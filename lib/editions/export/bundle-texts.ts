// The texts of a print bundle, written beside the plates' files once they are
// made: the captions and credits in the house style (house-style.ts), the proof
// PDF (proof.ts) and the printer's README (printer-notes.ts), which names the
// CMYK profile read back from the first CMYK file.
import { writeFile } from "node:fs/promises";
import { join } from "node:path";
import type { Edition } from "@/db/schema";
import { buildCaptionsText, buildCreditsText } from "./house-style";
import type { PlatePart } from "./plate-files";
import { buildPrinterReadme, readProfileFacts, README_FILE, type ProfileFacts } from "./printer-notes";
import { buildProofPdf } from "./proof";

export const CAPTIONS_FILE = "captions.txt";
export const CREDITS_FILE = "credits.txt";
export const PROOF_FILE = "proof.pdf";

/** A file that goes into the bundle: its name in the ZIP, where it is, its kind and its plate's position (null for the bundle's own files). */
export interface BundleFile {
  name: string;
  path: string;
  kind: string;
  position: number | null;
}

export interface BundleTextInput {
  edition: Pick<Edition, "title" | "issueLabel" | "embargoDate">;
  societyName: string;
  parts: PlatePart[];
  cmyk: boolean;
  greyscale: boolean;
  cmykProfilePath: string | undefined;
  warnings: string[];
}

/**
 * Writes the texts into `dir`. Returns every file of the bundle in ZIP order (the
 * plates' files, captions, credits, proof, README) and the CMYK profile's facts.
 */
export async function writeBundleTexts(dir: string, input: BundleTextInput): Promise<{ files: BundleFile[]; cmykFacts: ProfileFacts | null }> {
  const { edition, societyName, parts } = input;
  const files: BundleFile[] = parts.flatMap((p) => p.files.map((f) => ({ name: f.name, path: f.path, kind: f.kind, position: p.house.position })));
  const cmykFile = files.find((f) => f.kind === "tiff-cmyk");
  const cmykFacts = cmykFile ? await readProfileFacts(cmykFile.path) : null;

  const styleEdition = { title: edition.title, issueLabel: edition.issueLabel, societyName, embargoDate: edition.embargoDate };
  const houseEntries = parts.map((p) => p.house);
  const texts: [string, string, string][] = [
    [CAPTIONS_FILE, "captions", buildCaptionsText(styleEdition, houseEntries)],
    [CREDITS_FILE, "credits", buildCreditsText(styleEdition, houseEntries)],
  ];
  for (const [name, kind, text] of texts) {
    await writeFile(join(dir, name), text, "utf8");
    files.push({ name, path: join(dir, name), kind, position: null });
  }
  const readme = buildPrinterReadme({
    editionName: `${edition.title}${edition.issueLabel ? `, ${edition.issueLabel}` : ""}`,
    societyName,
    embargoDate: edition.embargoDate,
    plateCount: parts.length,
    files: [...files, { name: PROOF_FILE, kind: "proof", position: null }],
    cmyk: input.cmyk ? { facts: cmykFacts, custom: Boolean(input.cmykProfilePath) } : null,
    greyscale: input.greyscale,
    warnings: input.warnings,
  });
  await writeFile(join(dir, README_FILE), readme, "utf8");
  const proof = await buildProofPdf({ ...styleEdition, createdAt: new Date().toISOString() }, parts.map((p) => p.proof));
  await writeFile(join(dir, PROOF_FILE), proof);
  files.push({ name: PROOF_FILE, path: join(dir, PROOF_FILE), kind: "proof", position: null });
  files.push({ name: README_FILE, path: join(dir, README_FILE), kind: "readme", position: null });
  return { files, cmykFacts };
}

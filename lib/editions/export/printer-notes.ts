// What the printer reads first: README.txt in the print bundle. It lists the
// files, says in a printer's words which colour profiles the files carry and
// what they are for, and how the printer can have the CMYK files made with
// their own press profile. The profile is read back from a CMYK file of the
// bundle itself (ExifTool), so the words always match what was embedded.
import { exportExifTool } from "./embed";

export const README_FILE = "README.txt";

/** The facts of an embedded ICC profile that a printer uses to judge it. */
export interface ProfileFacts {
  description: string | null;
  copyright: string | null;
  /** ICC profile class, e.g. "Output Device Profile". */
  profileClass: string | null;
  /** e.g. "Reflective, Glossy, Positive, Color". */
  deviceAttributes: string | null;
  /** e.g. "2014:08:25 12:40:53". */
  created: string | null;
}

export async function readProfileFacts(path: string): Promise<ProfileFacts> {
  // Without -n: ExifTool's words for the header fields (profile class, device attributes).
  const tags = (await exportExifTool().readRaw(path, { readArgs: ["-G1", "-ICC_Profile:all", "-ICC-header:all"] })) as Record<string, unknown>;
  const text = (k: string) => {
    const v = tags[k];
    return typeof v === "string" && v.trim() ? v.trim() : null;
  };
  return {
    description: text("ICC_Profile:ProfileDescription"),
    copyright: text("ICC_Profile:ProfileCopyright"),
    profileClass: text("ICC-header:ProfileClass"),
    deviceAttributes: text("ICC-header:DeviceAttributes"),
    created: text("ICC-header:ProfileDateTime"),
  };
}

/**
 * The CMYK profile in a printer's words: its real name, where it comes from,
 * what it characterises and so what the CMYK files are good for.
 * libvips' built-in profile (description "Chemical proof", made with
 * ArgyllCMS and placed in the public domain) characterises a glossy
 * photographic proof print, not a press: read from the profile itself.
 */
export function describeCmykProfile(facts: ProfileFacts | null, custom: boolean): string {
  if (!facts) return "The CMYK files carry no ICC profile.";
  const name = facts.description ? `“${facts.description}”` : "an unnamed profile";
  const year = facts.created?.slice(0, 4);
  const made = [facts.copyright, year ? `dated ${year}` : null].filter(Boolean).join("; ");
  if (!custom && facts.description === "Chemical proof") {
    return [
      `The CMYK files carry the ICC profile ${name}: the general-purpose CMYK profile built into the libvips image library (${made}).`,
      `It describes a glossy photographic proof print (${facts.deviceAttributes ?? "reflective, glossy"}), not an offset or digital press, and no printing standard such as ISO coated or SWOP paper.`,
      "Use these CMYK files only for a first look. For the printed edition, convert the 16-bit sRGB TIFF files with your own press profile, or send us that profile (see below).",
    ].join(" ");
  }
  return [
    `The CMYK files carry the ICC profile ${name}${made ? ` (${made})` : ""}, an ${(facts.profileClass ?? "output device profile").toLowerCase()}${facts.deviceAttributes ? ` for ${facts.deviceAttributes.toLowerCase()} media` : ""}.`,
    custom ? "It is the profile the society was given for this printing; the CMYK files were converted with it (relative colorimetric intent)." : "",
  ]
    .filter(Boolean)
    .join(" ");
}

export interface ReadmeInput {
  editionName: string;
  societyName: string;
  embargoDate: string | null;
  plateCount: number;
  files: { name: string; kind: string; position: number | null }[];
  cmyk: { facts: ProfileFacts | null; custom: boolean } | null;
  greyscale: boolean;
  warnings: string[];
}

const KIND_WORDS: Record<string, string> = {
  "tiff-srgb": "16-bit TIFF in sRGB (ICC profile embedded): the full-quality file for print",
  jpeg: "JPEG in sRGB, highest quality: for layout and screens",
  "tiff-cmyk": "8-bit CMYK TIFF (profile named below)",
  "tiff-grey": "16-bit greyscale TIFF",
  captions: "the captions in the society's house style",
  credits: "the credits and licences",
  proof: "the proof: every plate at its printed size with its caption and credit",
};

export function buildPrinterReadme(r: ReadmeInput): string {
  const lines: string[] = [];
  lines.push(`${r.editionName}: print bundle from ${r.societyName}`);
  lines.push("");
  if (r.embargoDate) lines.push(`EMBARGO: not to be published before ${r.embargoDate}.`, "");
  lines.push(`${r.plateCount} plate${r.plateCount === 1 ? "" : "s"}. Start with the proof; each plate's files begin with its number in print order.`, "");
  if (r.warnings.length) {
    lines.push("CHECK BEFORE PRINTING", ...r.warnings.map((w) => `- ${w}`), "");
  }
  lines.push("FILES");
  for (const f of r.files) lines.push(`- ${f.name}: ${KIND_WORDS[f.kind] ?? f.kind}`);
  lines.push("- metadata.json: the same facts for software (sizes, credits, sky geometry)", "");
  lines.push("COLOUR");
  lines.push("The TIFF and JPEG files are in sRGB (IEC 61966-2-1) with the profile embedded.");
  if (r.cmyk) lines.push(describeCmykProfile(r.cmyk.facts, r.cmyk.custom));
  if (r.greyscale) lines.push("The greyscale TIFFs carry no profile: 16-bit grey with the sRGB tone curve.");
  lines.push("");
  lines.push("USING YOUR OWN PROFILE");
  lines.push(
    "To have the CMYK files made with your press and paper profile, send the profile (an .icc or .icm file) to the editor who sent you this bundle.",
    `The society's administrators install it, the editor makes the bundle again, and this file then names your profile. You can also convert the 16-bit sRGB TIFF files yourself.`,
  );
  lines.push("");
  return `${lines.join("\n")}\n`;
}

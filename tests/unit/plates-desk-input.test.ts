// The caption rule (40 words) as the editor counts it while the curator types
// and as the server enforces it: one function, so both agree by construction;
// these tests pin down what a "word" is.
import { describe, expect, it } from "vitest";
import { PLATE_LICENCES, PLATE_REPORT_KINDS, RENDITIONS, WITHDRAWAL_KINDS } from "@/db/schema/plates";
import { countWords as countWordsOnServer, CAPTION_MAX_WORDS } from "@/lib/plates/desk";
import { countWords, newVersionSchema, plateEditSchema, plateReportSchema, withdrawSchema } from "@/lib/plates/desk-input";
import { buildWebJpegTags } from "@/lib/plates/web-jpeg";

const words = (n: number) => Array.from({ length: n }, (_, i) => `word${i}`).join(" ");

const valid = {
  title: "Inner corona from the Luxor west bank",
  caption: "Streamers above the east limb during second contact.",
  description: "",
  altText: "A dark lunar disk ringed by pale coronal streamers.",
  acquiredBy: "Oskar Lindqvist",
  processedBy: "Crownlight pipeline 0.4.0",
  licence: "CC-BY-4.0",
  slug: "inner-corona-luxor",
};

describe("countWords", () => {
  it("counts words separated by any whitespace, ignoring leading and trailing space", () => {
    expect(countWords("")).toBe(0);
    expect(countWords("   \n\t ")).toBe(0);
    expect(countWords("  corona   at\tsecond\ncontact  ")).toBe(4);
  });

  it("counts a hyphenated word once, and a standing or joining dash as a separator", () => {
    expect(countWords("well-exposed long-exposure frames")).toBe(3);
    expect(countWords("corona — streamers")).toBe(2);
    expect(countWords("corona—streamers")).toBe(2);
    expect(countWords("10:05–10:11 UTC")).toBe(3);
  });

  it("does not count punctuation on its own, and counts words with punctuation attached", () => {
    expect(countWords("Totality ... & , ; — !")).toBe(1);
    expect(countWords("Luxor, Egypt: 6 min 25 s.")).toBe(6);
    expect(countWords("“Streamers,” she said.")).toBe(3);
  });

  it("counts letters of any script and numbers as words", () => {
    expect(countWords("Cádiz Ελλάδα 2027")).toBe(3);
  });

  it("is the same function the server module exports", () => {
    expect(countWordsOnServer).toBe(countWords);
    expect(CAPTION_MAX_WORDS).toBe(40);
  });
});

describe("the plate edit schema", () => {
  it("accepts 40 words and refuses 41, saying how many there are", () => {
    expect(plateEditSchema.safeParse({ ...valid, caption: words(40) }).success).toBe(true);
    const over = plateEditSchema.safeParse({ ...valid, caption: words(41) });
    expect(over.success).toBe(false);
    expect(over.error?.issues[0]).toMatchObject({ path: ["caption"] });
    expect(over.error?.issues[0].message).toContain("it has 41");
  });

  it("counts 40 hyphenated words as 40, however many hyphens", () => {
    const hyphenated = Array.from({ length: 40 }, () => "well-exposed").join(" ");
    expect(plateEditSchema.safeParse({ ...valid, caption: hyphenated }).success).toBe(true);
  });

  it("requires alt text and refuses a licence or slug outside the rules", () => {
    const noAlt = plateEditSchema.safeParse({ ...valid, altText: "   " });
    expect(noAlt.error?.issues.map((i) => i.path[0])).toContain("altText");
    expect(plateEditSchema.safeParse({ ...valid, licence: "GPL-3.0" }).error?.issues[0].path).toEqual(["licence"]);
    expect(plateEditSchema.safeParse({ ...valid, slug: "Has Spaces" }).error?.issues[0].path).toEqual(["slug"]);
    expect(plateEditSchema.safeParse({ ...valid, slug: "double--hyphen" }).success).toBe(false);
  });

  it("checks withdrawals, versions and reports", () => {
    expect(withdrawSchema.safeParse({ reason: "Rights question", kind: "later" }).success).toBe(false);
    expect(withdrawSchema.safeParse({ reason: "no", kind: "temporary" }).error?.issues[0].path).toEqual(["reason"]);
    expect(newVersionSchema.safeParse({ reductionId: "x", renditions: ["natural"], changeNote: "Better flat field" }).error?.issues[0].path).toEqual(["reductionId"]);
    expect(newVersionSchema.safeParse({ reductionId: "00000000-0000-4000-8000-000000000000", renditions: [], changeNote: "Better flat field" }).error?.issues[0].path).toEqual(["renditions"]);
    expect(plateReportSchema.safeParse({ kind: "rights", message: "This is my photograph.", email: "not-an-address" }).error?.issues[0].path).toEqual(["email"]);
  });
});

describe("client-safe copies of the schema's lists", () => {
  it("match the database schema exactly", () => {
    expect(plateEditSchema.shape.licence.options).toEqual([...PLATE_LICENCES]);
    expect(withdrawSchema.shape.kind.options).toEqual([...WITHDRAWAL_KINDS]);
    expect(plateReportSchema.shape.kind.options).toEqual([...PLATE_REPORT_KINDS]);
    expect(newVersionSchema.shape.renditions.element.options).toEqual([...RENDITIONS]);
  });
});

describe("web JPEG tags", () => {
  const credits = { title: "T", caption: "C", altText: "A", acquiredBy: "Nadia Fairweather", processedBy: "Crownlight pipeline 0.4.0", societyName: "Kestrel Ridge Astronomical Society" };
  it("put the licence URI in the web statement and both credits in the creator list", () => {
    const tags = buildWebJpegTags({ ...credits, licence: "CC-BY-SA-4.0" });
    expect(tags["XMP-xmpRights:WebStatement"]).toBe("http://creativecommons.org/licenses/by-sa/4.0/");
    expect(tags["XMP-dc:Creator"]).toEqual(["Nadia Fairweather", "Crownlight pipeline 0.4.0"]);
    expect(tags["XMP-dc:Rights"]).toContain("CC BY-SA 4.0");
    expect(tags["XMP-photoshop:Credit"]).toBe("Data: Nadia Fairweather; processing: Crownlight pipeline 0.4.0; Kestrel Ridge Astronomical Society");
  });
  it("say all rights reserved when the licence is not an open one", () => {
    const tags = buildWebJpegTags({ ...credits, licence: "all-rights-reserved" });
    expect(tags["XMP-dc:Rights"]).toBe("Nadia Fairweather. All rights reserved.");
    expect(tags["XMP-xmpRights:WebStatement"]).toBe("http://rightsstatements.org/vocab/InC/1.0/");
  });
});

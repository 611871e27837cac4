import { describe, expect, it } from "vitest";
import { editionNameSchema, embargoSchema, newEditionSchema, updateItemSchema } from "@/lib/editions/input";
import { parseInput } from "@/lib/validation";

const fieldsOf = (fn: () => unknown) => {
  try {
    fn();
  } catch (e) {
    return (e as { fields: { field: string; message: string }[] }).fields;
  }
  throw new Error("expected a refusal");
};

describe("edition input", () => {
  it("takes an empty or null embargo as none, and names a bad date with what came", () => {
    expect(parseInput(embargoSchema, { embargoDate: "" }).embargoDate).toBeNull();
    expect(parseInput(embargoSchema, { embargoDate: null }).embargoDate).toBeNull();
    expect(parseInput(embargoSchema, { embargoDate: "2027-10-01" }).embargoDate).toBe("2027-10-01");
    const [f] = fieldsOf(() => parseInput(embargoSchema, { embargoDate: "2027-02-30" })) as { field: string; message: string; received?: string }[];
    expect(f.field).toBe("embargoDate");
    expect(f.message).toMatch(/YYYY-MM-DD/);
    // What came is kept for API clients, apart from the sentence a person reads.
    expect(f.received).toBe('"2027-02-30"');
    expect(parseInput(newEditionSchema, { title: "Bulletin", kind: "journal" })).toMatchObject({ embargoDate: null, issueLabel: "" });
  });

  it("needs custom width and dpi only for the custom slot, coerced from form strings", () => {
    expect(parseInput(updateItemSchema, { slot: "web", rendition: "natural" })).toMatchObject({ slot: "web", captionOverride: "" });
    expect(parseInput(updateItemSchema, { slot: "custom", customWidthMm: "60", customDpi: "150", rendition: "natural" })).toMatchObject({ customWidthMm: 60, customDpi: 150 });
    const fields = fieldsOf(() => parseInput(updateItemSchema, { slot: "custom", customWidthMm: "", customDpi: "2400", rendition: "natural" }));
    expect(fields.map((f) => f.field).sort()).toEqual(["customDpi", "customWidthMm"]);
    expect(fieldsOf(() => parseInput(updateItemSchema, { slot: "poster", rendition: "natural" }))[0].field).toBe("slot");
  });

  it("renames with a trimmed title, a kind and an optional issue label, and names each bad field", () => {
    expect(parseInput(editionNameSchema, { title: " Bulletin ", kind: "journal" })).toEqual({ title: "Bulletin", kind: "journal", issueLabel: "" });
    const fields = fieldsOf(() => parseInput(editionNameSchema, { title: "", kind: "gazette", issueLabel: "x".repeat(81) }));
    expect(Object.fromEntries(fields.map((f) => [f.field, f.message]))).toEqual({
      title: "a title is required",
      kind: "expected newsletter or journal",
      issueLabel: "at most 80 characters",
    });
  });
});

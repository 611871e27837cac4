// Messages people read: field labels instead of keys, zod's developer English
// replaced by sentences, one date format, audit codes as phrases.
import { z } from "zod";
import { describe, expect, it } from "vitest";
import { describeAudit } from "@/lib/audit/labels";
import { fieldLabel } from "@/lib/field-labels";
import { formatDate, formatDateTime, formatTimeUtc } from "@/lib/format/dates";
import { parseInput } from "@/lib/validation";

function refusal(fn: () => unknown): { message: string; fields: { field: string; message: string; received?: string }[] } {
  try {
    fn();
  } catch (e) {
    return e as never;
  }
  throw new Error("expected a refusal");
}

describe("field labels", () => {
  it("reads keys as words, with their units, and never returns the key", () => {
    expect(fieldLabel("exposureS")).toBe("exposure time");
    expect(fieldLabel("altText")).toBe("alt text");
    expect(fieldLabel("customWidthMm")).toBe("width (mm)");
    expect(fieldLabel("sensorWidthMm")).toBe("sensor width (mm)");
    expect(fieldLabel("peakLatDeg")).toBe("peak lat (degrees)");
    expect(fieldLabel("frames.2.exposureS")).toBe("exposure time of item 3");
    expect(fieldLabel("(input)")).toBe("the request");
  });
});

describe("validation messages", () => {
  const schema = z.object({
    exposureS: z.coerce.number().min(0.0001),
    altText: z.string().max(5),
    licence: z.enum(["CC-BY-4.0", "CC0-1.0"]),
    email: z.email(),
    title: z.string(),
  });

  it("names each field by its label and says what is expected, without zod's English or what came", () => {
    const err = refusal(() => parseInput(schema, { exposureS: "0", altText: "far too long", licence: "x", email: "nope" }));
    const byField = Object.fromEntries(err.fields.map((f) => [f.field, f.message]));
    expect(byField).toEqual({
      exposureS: "must be at least 0.0001",
      altText: "must be at most 5 characters",
      licence: "must be one of: CC-BY-4.0, CC0-1.0",
      email: "is not an e-mail address",
      title: "is required",
    });
    expect(err.message).toBe("Exposure time: must be at least 0.0001; Alt text: must be at most 5 characters; Licence: must be one of: CC-BY-4.0, CC0-1.0; E-mail: is not an e-mail address; Title: is required.");
    expect(err.message).not.toMatch(/exposureS|altText|received|Invalid|Too (big|small)/);
    // What came stays available for API clients.
    expect(err.fields.find((f) => f.field === "exposureS")?.received).toBe('"0"');
  });

  it("keeps a schema's own message, which is written for people already", () => {
    const own = z.object({ name: z.string().min(1, { error: "give the kit a name" }) });
    expect(refusal(() => parseInput(own, { name: "" })).fields[0].message).toBe("give the kit a name");
  });
});

describe("the society's date format", () => {
  it("writes the month in words and times in UTC, saying so", () => {
    expect(formatDate("2027-08-02")).toBe("2 Aug 2027");
    expect(formatDate("2027-08-02T23:30:00Z")).toBe("2 Aug 2027");
    expect(formatDateTime("2027-08-02T10:05:12.400Z")).toBe("2 Aug 2027, 10:05 UTC");
    expect(formatDateTime("2027-08-02T10:05:12Z", { seconds: true })).toBe("2 Aug 2027, 10:05:12 UTC");
    expect(formatDateTime(new Date("2027-08-02T00:00:00Z"))).toBe("2 Aug 2027, 00:00 UTC");
    expect(formatTimeUtc("2027-08-02T08:47:03Z")).toBe("08:47:03 UTC");
    expect(formatDate(null)).toBe("");
    expect(formatDate("not a date")).toBe("");
  });

  it("follows a locale when given one", () => {
    expect(formatDate("2027-08-02", "de-DE")).toBe("2. Aug. 2027");
  });
});

describe("audit phrases", () => {
  it("reads every action as words, even one without a phrase", () => {
    expect(describeAudit("plate.created")).toBe("draft made");
    expect(describeAudit("review.request-changes")).toBe("changes asked for");
    expect(describeAudit("something.new-thing")).toBe("new thing");
  });
});

import { describe, expect, it } from "vitest";
import { buildCreditLine, checkCreditTemplate, DEFAULT_CREDIT_TEMPLATE } from "@/lib/review/credit-line";

describe("credit line", () => {
  it("fills the default template", () => {
    expect(buildCreditLine(DEFAULT_CREDIT_TEMPLATE, { acquiredBy: "Oskar Lindqvist", society: "Kestrel Ridge Astronomical Society", processedBy: "Crownlight pipeline 1.4.0" })).toBe(
      "Oskar Lindqvist / Kestrel Ridge Astronomical Society; processing: Crownlight pipeline 1.4.0",
    );
  });

  it("uses a placeholder twice and squeezes whitespace from the values", () => {
    expect(buildCreditLine("{acquiredBy}  ({year}), © {acquiredBy}", { acquiredBy: " Nadia Fairweather ", year: "2027" })).toBe("Nadia Fairweather (2027), © Nadia Fairweather");
  });

  it("refuses an unknown placeholder and names it", () => {
    expect(() => buildCreditLine("{photographer} / {society}", { society: "KRAS" })).toThrow(/unknown placeholder \{photographer\}/);
    expect(checkCreditTemplate("{society} {Society}")).toEqual([expect.stringContaining("{Society}")]);
  });

  it("refuses a stray brace", () => {
    expect(checkCreditTemplate("{society} }")).toEqual(["a brace without its partner"]);
    expect(() => buildCreditLine("{society", { society: "KRAS" })).toThrow(/brace/);
  });

  it("refuses a known placeholder with no value instead of printing a hole", () => {
    expect(() => buildCreditLine(DEFAULT_CREDIT_TEMPLATE, { acquiredBy: "Priya Raman-Holt", society: "KRAS", processedBy: "  " })).toThrow(/\{processedBy\}/);
  });

  it("accepts a template without placeholders", () => {
    expect(checkCreditTemplate("Kestrel Ridge Astronomical Society")).toEqual([]);
    expect(buildCreditLine("Kestrel Ridge Astronomical Society", {})).toBe("Kestrel Ridge Astronomical Society");
  });
});

describe("credit-line placeholders in words", () => {
  it("takes {observer} and {processing} as the two credits, beside the older names", () => {
    expect(buildCreditLine("{observer} / {society}; processing: {processing}", { acquiredBy: "Oskar Lindqvist", society: "KRAS", processedBy: "Crownlight pipeline 1.4.0" })).toBe("Oskar Lindqvist / KRAS; processing: Crownlight pipeline 1.4.0");
    expect(checkCreditTemplate("{observer} {acquiredBy}")).toEqual([]);
    expect(checkCreditTemplate("{photographer}")[0]).toMatch(/use \{observer\}, \{processing\}/);
  });
});

// The composite's start request, checked as the server checks it: each problem names the field in words.
import { describe, expect, it } from "vitest";
import { compositeRequestSchema } from "@/lib/composites/composites";
import { parseInput } from "@/lib/validation";
import { AppError } from "@/lib/errors";

describe("a composite's start request", () => {
  it("names its fields in words, never by their code names", () => {
    let error: unknown;
    try {
      parseInput(compositeRequestSchema, { title: "", reductionIds: ["7b6f0c1e-3d2a-4c5b-9e8f-1a2b3c4d5e6f"], scaleArcsecPerPx: -2 });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(AppError);
    const problems = (error as AppError).fields ?? [];
    const text = [(error as AppError).message, ...problems.map((p) => p.message)].join(" ");
    expect(text).toMatch(/reductions to compose/i);
    expect(text).toMatch(/plate scale \(arcsec per pixel\)/i);
    expect(text).not.toMatch(/reductionIds|scaleArcsecPerPx/);
  });
});

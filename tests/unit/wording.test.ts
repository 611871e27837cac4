import { describe, expect, it } from "vitest";
import { findDeveloperWording, schemaFieldKeys } from "../support/wording";

const keys = new Set(["exposureS", "altText", "captionOverride"]);

describe("the developer-wording scan", () => {
  it("collects the camelCase field keys of our zod schemas", () => {
    const found = schemaFieldKeys();
    for (const k of ["exposureS", "altText", "captionOverride", "filterStrength"]) expect(found.has(k)).toBe(true);
    expect(found.has("name")).toBe(false);
  });

  it("finds field keys, flags, event codes, state slugs and '(received ...)'", () => {
    const text = 'exposureS: must be at least 0.0001 (received "abc"). Run it with --register sun. History: plate.created by Ada. The set is awaiting-review.';
    expect(findDeveloperWording(text, keys).map((f) => `${f.kind}:${f.text}`)).toEqual([
      "field key:exposureS",
      "flag:--register",
      "event code:plate.created",
      "state slug:awaiting-review",
      'received:(received "abc")',
    ]);
  });

  it("passes people's prose: sentences, file names, e-mail and web addresses, decimals", () => {
    const text =
      "Exposure time: must be at least 0.0001. Download proof.pdf and captions.txt, or the master (master.fits). Write to ada.lovelace@kestrel-ridge.example or see https://example.org/a.b/c.d. The set is awaiting review. Alt text is required, e.g. for screen readers. A dash -- like this.";
    expect(findDeveloperWording(text, keys)).toEqual([]);
  });
});

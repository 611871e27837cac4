import { describe, expect, it } from "vitest";
import { buildFileNames, checkTemplate, DEFAULT_FILE_NAME_TEMPLATE, isSafeFileName, renderBaseName, safePart } from "@/lib/editions/file-names";

const base = { date: "2027-08-02", time: "10:05:12", version: 1, slot: "full-width" };

describe("edition file names", () => {
  it("fills the default template", () => {
    expect(renderBaseName(DEFAULT_FILE_NAME_TEMPLATE, { ...base, observer: "Oskar Lindqvist" })).toBe("2027-08-02_10-05-12_Oskar-Lindqvist_v1_full-width");
  });

  it("folds accents and drops slashes, spaces and emoji", () => {
    expect(safePart("Ñadia Fairwéather-Ødegård")).toBe("Nadia-Fairweather-odegard");
    expect(safePart("../../etc/passwd")).toBe("etc-passwd");
    expect(safePart("Priya 🌒 Raman\\Holt")).toBe("Priya-Raman-Holt");
    expect(safePart("Straße")).toBe("Strasse");
  });

  it("never starts with a dot and keeps only safe characters", () => {
    const [a, b] = buildFileNames("{observer}", [
      { values: { observer: ".hidden" }, extension: "tif" },
      { values: { observer: "...//.. " }, extension: ".jpg" },
    ]);
    expect(a).toBe("hidden.tif");
    expect(b).toBe("plate.jpg");
    for (const n of [a, b]) expect(isSafeFileName(n)).toBe(true);
  });

  it("cuts very long names to the limit and keeps the extension", () => {
    const [name] = buildFileNames(DEFAULT_FILE_NAME_TEMPLATE, [{ values: { ...base, observer: "A".repeat(300) }, extension: "tiff" }]);
    expect(name.length).toBeLessThanOrEqual(100);
    expect(name.endsWith(".tiff")).toBe(true);
    expect(isSafeFileName(name)).toBe(true);
  });

  it("keeps names unique within an edition, without regard to case", () => {
    const names = buildFileNames(DEFAULT_FILE_NAME_TEMPLATE, [
      { values: { ...base, observer: "Oskar" }, extension: "tif" },
      { values: { ...base, observer: "oskar" }, extension: "tif" },
      { values: { ...base, observer: "Oskar" }, extension: "tif" },
      { values: { ...base, observer: "Oskar" }, extension: "jpg" },
    ]);
    expect(names[1].toLowerCase()).not.toBe(names[0].toLowerCase());
    expect(names[2]).toMatch(/-3\.tif$/);
    expect(names[3]).toMatch(/full-width\.jpg$/);
    expect(new Set(names.map((n) => n.toLowerCase())).size).toBe(4);
  });

  it("keeps unique names within the length limit too", () => {
    const long = { ...base, observer: "B".repeat(200) };
    const names = buildFileNames(DEFAULT_FILE_NAME_TEMPLATE, [{ values: long, extension: "tif" }, { values: long, extension: "tif" }], 60);
    expect(names[0]).not.toBe(names[1]);
    for (const n of names) expect(isSafeFileName(n, 60)).toBe(true);
  });

  it("names unknown template fields", () => {
    expect(checkTemplate("{date}_{camera}")).toMatch(/\{camera\}/);
    expect(checkTemplate("plain")).toMatch(/at least one field/);
    expect(() => renderBaseName("{nope}", {})).toThrow(/\{nope\}/);
  });
});

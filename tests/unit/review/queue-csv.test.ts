import { describe, expect, it } from "vitest";
import { csvCell, queueQuerySchema } from "@/lib/review/queue";

describe("review queue CSV cells", () => {
  it("quotes commas, quotes and line breaks", () => {
    expect(csvCell('Luxor, "west bank"')).toBe('"Luxor, ""west bank"""');
    expect(csvCell("two\nlines")).toBe('"two\nlines"');
    expect(csvCell(12)).toBe("12");
    expect(csvCell(null)).toBe("");
  });

  it("keeps a set name from running as a spreadsheet formula", () => {
    expect(csvCell("=HYPERLINK(\"http://x\")")).toBe("\"'=HYPERLINK(\"\"http://x\"\")\"");
    expect(csvCell("+1")).toBe("'+1");
    expect(csvCell("@SUM(A1)")).toBe("'@SUM(A1)");
  });
});

describe("review queue filters", () => {
  it("default to sets awaiting review, oldest first, page 1", () => {
    expect(queueQuerySchema.parse({})).toEqual({ state: "awaiting-review", sort: "submitted", dir: "asc", page: 1 });
    expect(queueQuerySchema.parse({ state: "", eclipse: "", page: "" })).toMatchObject({ state: "awaiting-review", page: 1 });
  });

  it("name the filter and the fault for bad values", () => {
    const r = queueQuerySchema.safeParse({ state: "gathering", sort: "password", page: "0", eclipse: "2027" });
    expect(r.success).toBe(false);
    expect(r.error?.issues.map((i) => i.path.join(".")).sort()).toEqual(["eclipse", "page", "sort", "state"]);
  });
});

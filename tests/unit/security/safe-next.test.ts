// After sign-in only a plain path on this site is followed. Each refused
// variant would, in some browser or server, lead to another origin.
import { describe, expect, it } from "vitest";
import { safeNextPath } from "@/lib/http/safe-next";

export const HOSTILE_NEXT = [
  "/\\evil.example/x",
  "\\\\evil.example",
  "//evil.example",
  "///evil.example",
  "/\\/evil.example",
  "https://evil.example",
  "http:evil.example",
  "javascript:alert(1)",
  "%2F%2Fevil.example",
  "/%2F%2Fevil.example",
  "/%2f/evil.example",
  "/%5Cevil.example",
  "/%5cevil.example",
  "/%252F%252Fevil.example",
  "/%25252F%25252Fevil.example",
  "\t//evil.example",
  "/\t/evil.example",
  "/\n/evil.example",
  "/\r/evil.example",
  "/%09/evil.example",
  "/%0A/evil.example",
  "/%00/evil.example",
  "/.//evil.example",
  "/../..//evil.example",
  "/%2E//evil.example",
  " /x",
  "",
];

describe("safeNextPath", () => {
  it.each(HOSTILE_NEXT)("refuses %j", (next) => {
    expect(safeNextPath(next)).toBe("/");
  });

  it("keeps plain paths with their query and fragment", () => {
    expect(safeNextPath("/studio/sets/42?tab=frames#limb")).toBe("/studio/sets/42?tab=frames#limb");
    expect(safeNextPath("/gallery?q=50%25%20grey")).toBe("/gallery?q=50%25%20grey");
    expect(safeNextPath("/a/./b/../c")).toBe("/a/c");
    expect(safeNextPath(undefined, "/studio")).toBe("/studio");
    expect(safeNextPath(["/x"])).toBe("/");
  });
});

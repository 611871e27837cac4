// After sign-in only a plain path on this site is followed. Each refused
// variant would, in some browser or server, lead to another origin.
import { describe, expect, it } from "vitest";
import { safeNextPath } from "@/lib/http/safe-next";
import { HOSTILE_NEXT } from "../../support/hostile-next";


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

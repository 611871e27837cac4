import { describe, expect, it } from "vitest";
import { DISPLAY_NAME_MAX, displayNameProblem } from "@/lib/auth/display-name";
import { isCommonPassword } from "@/lib/auth/password-policy";

describe("display names", () => {
  it("accepts names people have", () => {
    for (const name of ["Wren Calloway", "Zoë Ó Súilleabháin-Ndlovu", "J.R.R. Tolkien", "Dr. Amaka Eze", "李小龙", "A".repeat(DISPLAY_NAME_MAX)]) {
      expect(displayNameProblem(name), name).toBeNull();
    }
  });

  it("refuses long names, control characters and web addresses, saying why", () => {
    expect(displayNameProblem("A".repeat(DISPLAY_NAME_MAX + 1))).toMatch(/at most 80 characters/);
    expect(displayNameProblem("x")).toMatch(/at least 2 characters/);
    expect(displayNameProblem("Wren\nCalloway")).toMatch(/control characters/);
    expect(displayNameProblem("Wren\u202eyawollaC")).toMatch(/control characters/);
    expect(displayNameProblem("Claim your prize at https://evil.example/win")).toMatch(/web address/);
    expect(displayNameProblem("visit evil.example now")).toMatch(/web address/);
    expect(displayNameProblem("www.evil")).toMatch(/web address/);
    expect(displayNameProblem("write to prizes@evil.example")).toMatch(/e-mail address/);
    expect(displayNameProblem(42)).toMatch(/Enter your name/);
  });
});

describe("common passwords", () => {
  it("finds passwords from the published lists, whatever their case", () => {
    expect(isCommonPassword("1234567890")).toBe(true);
    expect(isCommonPassword("Password123")).toBe(true);
    expect(isCommonPassword("qwertyuiop")).toBe(true);
  });

  it("lets a password of one's own through", () => {
    expect(isCommonPassword("umbra-penumbra-1")).toBe(false);
    expect(isCommonPassword("kestrel-ridge-2027")).toBe(false);
  });
});

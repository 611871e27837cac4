import { describe, expect, it } from "vitest";
import { navFor } from "@/lib/auth/nav";
import { ACTIONS, allowedActions, can, PERMISSIONS, type Action } from "@/lib/auth/permissions";
import { ROLES, type Role } from "@/lib/auth/roles";

// The intended table, written out independently of lib/auth/permissions.ts so
// that a change there has to be made on purpose in both places.
const EXPECTED: Record<Action, Role[]> = {
  "studio:use": ["member"],
  "brackets:own": ["member"],
  "review:use": ["curator"],
  "brackets:read-all": ["curator"],
  "editions:use": ["editor", "admin"],
  "people:list": ["admin"],
  "roles:grant": ["admin"],
  "settings:edit": ["admin"],
  "audit:read": ["admin"],
  "eclipses:edit": ["admin"],
};

describe("permission table", () => {
  it("lists exactly the expected actions", () => {
    expect([...ACTIONS].sort()).toEqual(Object.keys(EXPECTED).sort());
  });

  for (const action of Object.keys(EXPECTED) as Action[]) {
    for (const role of ROLES) {
      const allowed = EXPECTED[action].includes(role);
      it(`${role} ${allowed ? "may" : "may not"} ${action}`, () => {
        expect(can([role], action)).toBe(allowed);
      });
    }
  }

  it("allows nothing without roles", () => {
    for (const action of ACTIONS) expect(can([], action)).toBe(false);
  });

  it("takes the union over every combination of roles", () => {
    // All 15 non-empty subsets of the four roles.
    for (let mask = 1; mask < 1 << ROLES.length; mask++) {
      const held = ROLES.filter((_, i) => mask & (1 << i));
      for (const action of ACTIONS) {
        const expected = held.some((r) => EXPECTED[action].includes(r));
        expect(can(held, action), `${held.join("+")} ${action}`).toBe(expected);
      }
    }
  });

  it("refuses an unknown action instead of failing open", () => {
    expect(can(["admin", "curator", "editor", "member"], "nonexistent:action" as Action)).toBe(false);
  });

  it("reports allowed actions for a curator-editor", () => {
    expect(allowedActions(["curator", "editor"]).sort()).toEqual(["brackets:read-all", "editions:use", "review:use"]);
  });

  it("every permission names at least one known role", () => {
    for (const roles of Object.values(PERMISSIONS)) {
      expect(roles.length).toBeGreaterThan(0);
      for (const r of roles) expect(ROLES).toContain(r);
    }
  });
});

describe("navigation by role", () => {
  const hrefs = (roles: Role[]) => navFor(roles).map((e) => e.href);

  it("shows a visitor only the public entries", () => {
    expect(hrefs([])).toEqual(["/", "/gallery", "/eclipses", "/planner"]);
  });

  it("shows a member the studio but not the desks", () => {
    expect(hrefs(["member"])).toEqual(["/", "/gallery", "/eclipses", "/planner", "/studio"]);
  });

  it("adds the review desk when curator is granted", () => {
    expect(hrefs(["member", "curator"])).toEqual(["/", "/gallery", "/eclipses", "/planner", "/studio", "/review"]);
  });

  it("shows an admin the admin area", () => {
    expect(hrefs(["admin"])).toContain("/admin");
  });
});

import { describe, expect, it } from "vitest";
import { AppError } from "@/lib/errors";
import { availableActions, planTransition, REVIEW_ACTIONS, REVIEW_STATES, type ReviewAction, type ReviewRole, type ReviewState } from "@/lib/review/state-machine";
import { BRACKET_SET_STATES } from "@/db/schema/brackets";

// The expected table, written out independently of TRANSITIONS: [from, action] -> to, or absent when illegal.
const LEGAL: Record<string, ReviewState> = {
  "gathering submit": "awaiting-review",
  "changes-requested submit": "awaiting-review",
  "awaiting-review request-changes": "changes-requested",
  "awaiting-review approve": "approved",
  "awaiting-review reject": "rejected",
  "approved reopen": "awaiting-review",
  "rejected reopen": "awaiting-review",
  "changes-requested reopen": "awaiting-review",
};
const BY: Record<ReviewAction, ReviewRole> = { submit: "owner", "request-changes": "curator", approve: "curator", reject: "curator", reopen: "curator" };
const FULL = { reasonCode: "exposure-times", message: "Please check frame 3.", note: "Approved the wrong set." };

function errorOf(fn: () => unknown): AppError {
  try {
    fn();
  } catch (err) {
    if (err instanceof AppError) return err;
    throw err;
  }
  throw new Error("no error thrown");
}

describe("review state machine", () => {
  it("knows the same states as the bracket-set schema", () => {
    expect([...REVIEW_STATES].sort()).toEqual([...BRACKET_SET_STATES].sort());
  });

  for (const from of REVIEW_STATES) {
    for (const action of REVIEW_ACTIONS) {
      const key = `${from} ${action}`;
      const to = LEGAL[key];
      if (to) {
        it(`${key} -> ${to}`, () => {
          const t = planTransition(from, action, BY[action], FULL);
          expect(t).toEqual({ from, to, action, isResubmission: key === "changes-requested submit" });
        });
      } else {
        it(`${key} is refused, naming the state and the action`, () => {
          const err = errorOf(() => planTransition(from, action, BY[action], FULL));
          expect(err.code).toBe("conflict");
          expect(err.message).toContain(from.replace("-", " ").replace("gathering", "gathering frames"));
          expect(err.message).toMatch(/send for review|ask for changes|approve|reject|reopen/);
        });
      }
    }
  }

  it("lets only the owner submit and only a curator decide", () => {
    expect(errorOf(() => planTransition("gathering", "submit", "curator")).code).toBe("forbidden");
    for (const a of ["request-changes", "approve", "reject"] as const) {
      expect(errorOf(() => planTransition("awaiting-review", a, "owner", FULL)).code).toBe("forbidden");
    }
    expect(errorOf(() => planTransition("approved", "reopen", "owner", FULL)).code).toBe("forbidden");
  });

  it("requires a reason and a message to ask for changes, naming each missing field", () => {
    const err = errorOf(() => planTransition("awaiting-review", "request-changes", "curator", { reasonCode: " ", message: "" }));
    expect(err.code).toBe("invalid_input");
    expect(err.fields.map((f) => f.field)).toEqual(["reasonCode", "message"]);
  });

  it("requires a reason to reject and a note to reopen; approval needs neither", () => {
    expect(errorOf(() => planTransition("awaiting-review", "reject", "curator", { message: "no" })).fields.map((f) => f.field)).toEqual(["reasonCode"]);
    expect(errorOf(() => planTransition("rejected", "reopen", "curator", {})).fields.map((f) => f.field)).toEqual(["note"]);
    expect(planTransition("awaiting-review", "approve", "curator").to).toBe("approved");
  });

  it("offers each role only its legal actions", () => {
    expect(availableActions("awaiting-review", "curator")).toEqual(["request-changes", "approve", "reject"]);
    expect(availableActions("changes-requested", "curator")).toEqual(["reopen"]);
    expect(availableActions("changes-requested", "owner")).toEqual(["submit"]);
    expect(availableActions("gathering", "curator")).toEqual([]);
  });
});

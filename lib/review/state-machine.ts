// The review states of a bracket set and the moves between them. Pure: the
// decisions service and the photographer's submit both ask it, so a move that
// is not in this table cannot happen anywhere.
import { BRACKET_SET_STATES, REVIEW_DECISION_ACTIONS, type BracketSetState, type ReviewDecisionAction } from "@/db/schema/review-states";
import { AppError, type FieldProblem } from "@/lib/errors";

/** The set's states and the review's moves are the columns' own lists (db/schema/review-states.ts), under the names the desk uses. */
export const REVIEW_STATES = BRACKET_SET_STATES;
export type ReviewState = BracketSetState;
export const REVIEW_ACTIONS = REVIEW_DECISION_ACTIONS;
export type ReviewAction = ReviewDecisionAction;

/** The actions a curator takes on the desk (submit is the photographer's). */
export const CURATOR_ACTIONS = ["request-changes", "approve", "reject", "reopen"] as const satisfies readonly ReviewAction[];
export type CuratorAction = (typeof CURATOR_ACTIONS)[number];

export type ReviewRole = "owner" | "curator";
type Requirement = "reasonCode" | "message" | "note";

interface Rule {
  from: readonly ReviewState[];
  to: ReviewState;
  by: ReviewRole;
  requires: readonly Requirement[];
}

export const TRANSITIONS: Record<ReviewAction, Rule> = {
  submit: { from: ["gathering", "changes-requested"], to: "awaiting-review", by: "owner", requires: [] },
  "request-changes": { from: ["awaiting-review"], to: "changes-requested", by: "curator", requires: ["reasonCode", "message"] },
  approve: { from: ["awaiting-review"], to: "approved", by: "curator", requires: [] },
  reject: { from: ["awaiting-review"], to: "rejected", by: "curator", requires: ["reasonCode"] },
  // Undoes a mistaken decision: the set goes back to the desk.
  reopen: { from: ["approved", "rejected", "changes-requested"], to: "awaiting-review", by: "curator", requires: ["note"] },
};

export const STATE_LABELS: Record<ReviewState, string> = {
  gathering: "gathering frames",
  "awaiting-review": "awaiting review",
  "changes-requested": "changes requested",
  approved: "approved",
  rejected: "rejected",
};

export const ACTION_LABELS: Record<ReviewAction, string> = {
  submit: "send for review",
  "request-changes": "ask for changes",
  approve: "approve",
  reject: "reject",
  reopen: "reopen",
};

const REQUIREMENT_TEXT: Record<Requirement, string> = {
  reasonCode: "a reason chosen from the list",
  message: "a message to the photographer",
  note: "a note saying why the decision is undone",
};

export interface TransitionInput {
  reasonCode?: string | null;
  message?: string | null;
  note?: string | null;
}

export interface PlannedTransition {
  from: ReviewState;
  to: ReviewState;
  action: ReviewAction;
  /** True for a submit after changes were requested. */
  isResubmission: boolean;
}

export function isReviewState(s: string): s is ReviewState {
  return (REVIEW_STATES as readonly string[]).includes(s);
}

export function isReviewAction(s: string): s is ReviewAction {
  return (REVIEW_ACTIONS as readonly string[]).includes(s);
}

/** True when `action` may be taken from `from` (requirements aside). */
export function canTransition(from: ReviewState, action: ReviewAction): boolean {
  return TRANSITIONS[action].from.includes(from);
}

/** The actions open to a role from a state, for forms that offer only legal moves. */
export function availableActions(from: ReviewState, by: ReviewRole): ReviewAction[] {
  return REVIEW_ACTIONS.filter((a) => TRANSITIONS[a].by === by && canTransition(from, a));
}

/**
 * The move for `action` from `from`, or an error: a conflict naming the state
 * and the action when the move is illegal, a field problem for each missing
 * reason, message or note, and forbidden when the wrong party takes it.
 */
export function planTransition(from: ReviewState, action: ReviewAction, by: ReviewRole, input: TransitionInput = {}): PlannedTransition {
  const rule = TRANSITIONS[action];
  if (rule.by !== by) {
    throw new AppError(
      "forbidden",
      rule.by === "owner" ? `Only the photographer who owns the set can ${ACTION_LABELS[action]}.` : `Only a curator can ${ACTION_LABELS[action]} a bracket set.`,
    );
  }
  if (!rule.from.includes(from)) {
    const allowed = rule.from.map((s) => STATE_LABELS[s]).join(" or ");
    throw new AppError("conflict", `A bracket set that is ${STATE_LABELS[from]} cannot be given the action "${ACTION_LABELS[action]}"; that needs a set that is ${allowed}.`);
  }
  const missing: FieldProblem[] = rule.requires
    .filter((r) => !(input[r] ?? "").trim())
    .map((r) => ({ field: r, message: `"${ACTION_LABELS[action]}" needs ${REQUIREMENT_TEXT[r]}` }));
  if (missing.length) throw new AppError("invalid_input", missing.map((m) => `${m.field}: ${m.message}`).join("; "), missing);
  return { from, to: rule.to, action, isResubmission: action === "submit" && from === "changes-requested" };
}

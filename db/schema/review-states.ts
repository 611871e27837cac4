// The states a bracket set takes and the moves of its review, as the columns
// store them: the one list of each. Plain values with no table, so that pages
// in the browser import them without the schema; which move leads from which
// state to which is lib/review/state-machine.ts's.

/** gathering: frames being uploaded; the review states are set by the review desk. */
export const BRACKET_SET_STATES = ["gathering", "awaiting-review", "changes-requested", "approved", "rejected"] as const;
export type BracketSetState = (typeof BRACKET_SET_STATES)[number];

/** The moves of a set's review: the photographer's submission and the curators' decisions. */
export const REVIEW_DECISION_ACTIONS = ["submit", "request-changes", "approve", "reject", "reopen"] as const;
export type ReviewDecisionAction = (typeof REVIEW_DECISION_ACTIONS)[number];

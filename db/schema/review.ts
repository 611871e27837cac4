// The review desk: every decision a curator takes on a bracket set, the
// curators' private notes (never read by anything the photographer sees), and
// who on the desk has taken a set in hand.
import { index, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { bracketSets } from "./brackets";
import { reductions } from "./reductions";
import { BRACKET_SET_STATES, REVIEW_DECISION_ACTIONS } from "./review-states";

export { REVIEW_DECISION_ACTIONS, type ReviewDecisionAction } from "./review-states";

export const reviewDecisions = pgTable(
  "review_decisions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    bracketSetId: uuid("bracket_set_id")
      .notNull()
      .references(() => bracketSets.id, { onDelete: "cascade" }),
    fromState: text("from_state", { enum: BRACKET_SET_STATES }).notNull(),
    toState: text("to_state", { enum: BRACKET_SET_STATES }).notNull(),
    action: text("action", { enum: REVIEW_DECISION_ACTIONS }).notNull(),
    reasonCode: text("reason_code"),
    // The reason's wording when the decision was taken: admins may reword the list later.
    reasonLabel: text("reason_label"),
    messageToPhotographer: text("message_to_photographer"),
    decidedBy: text("decided_by").references(() => users.id, { onDelete: "set null" }),
    reductionId: uuid("reduction_id").references(() => reductions.id, { onDelete: "set null" }),
    pipelineVersion: text("pipeline_version"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("review_decisions_set_idx").on(t.bracketSetId, t.createdAt)],
);

/** Curators' notes to each other. Private: no photographer-facing query or DTO reads this table. */
export const curatorNotes = pgTable(
  "curator_notes",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    bracketSetId: uuid("bracket_set_id")
      .notNull()
      .references(() => bracketSets.id, { onDelete: "cascade" }),
    authorId: text("author_id").references(() => users.id, { onDelete: "set null" }),
    decisionId: uuid("decision_id").references(() => reviewDecisions.id, { onDelete: "set null" }),
    body: text("body").notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("curator_notes_set_idx").on(t.bracketSetId, t.createdAt)],
);

/** The curator who has taken a set in hand, so two curators do not review the same set unknowingly. */
export const reviewAssignments = pgTable("review_assignments", {
  bracketSetId: uuid("bracket_set_id")
    .primaryKey()
    .references(() => bracketSets.id, { onDelete: "cascade" }),
  curatorId: text("curator_id")
    .notNull()
    .references(() => users.id, { onDelete: "cascade" }),
  assignedAt: timestamp("assigned_at", { withTimezone: true }).notNull().defaultNow(),
});

export type ReviewDecision = typeof reviewDecisions.$inferSelect;
export type CuratorNote = typeof curatorNotes.$inferSelect;

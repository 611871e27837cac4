// Reductions: one processing run of a bracket set with its parameters. A set
// has many; none overwrites another (outputs live under the reduction's id).
import { index, integer, jsonb, pgTable, real, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { bracketSets } from "./brackets";

export const REDUCTION_STATES = ["queued", "running", "done", "failed"] as const;
export type ReductionState = (typeof REDUCTION_STATES)[number];

export interface ReductionParamsRecord {
  registration: "sun" | "moon" | "corona";
  filter: "mgn" | "nrgf";
  recoverResponse: boolean;
  /** Added later; older rows lack them (read as 0.3, full size, all groups). */
  filterStrength?: number;
  outputLongSidePx?: number;
  groupNumber?: number | null;
}

export const reductions = pgTable(
  "reductions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    bracketSetId: uuid("bracket_set_id")
      .notNull()
      .references(() => bracketSets.id, { onDelete: "cascade" }),
    requestedBy: text("requested_by").references(() => users.id, { onDelete: "set null" }),
    params: jsonb("params").$type<ReductionParamsRecord>().notNull(),
    state: text("state", { enum: REDUCTION_STATES }).notNull().default("queued"),
    stage: text("stage"),
    progress: real("progress").notNull().default(0),
    /** For a stage that works frame by frame: frames done of frames to do (null otherwise). */
    stageFramesDone: integer("stage_frames_done"),
    stageFramesTotal: integer("stage_frames_total"),
    error: text("error"),
    pipelineVersion: text("pipeline_version"),
    /** Object keys of the outputs by role (master, natural, structure, preview, report, tiles prefix). */
    outputs: jsonb("outputs").$type<Record<string, string>>(),
    /** report.json's overall section: measurements, timings, parameters. */
    measurements: jsonb("measurements").$type<Record<string, unknown>>(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { withTimezone: true }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
  },
  (t) => [index("reductions_set_idx").on(t.bracketSetId)],
);

export type Reduction = typeof reductions.$inferSelect;

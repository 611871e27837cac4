// Job state mirrored from BullMQ so that pages read progress from PostgreSQL,
// never from Redis. One row per job id (job ids are deterministic).
import { index, integer, jsonb, pgTable, real, text, timestamp } from "drizzle-orm/pg-core";

export const JOB_STATES = ["queued", "running", "done", "failed"] as const;
export type JobState = (typeof JOB_STATES)[number];

export const jobRuns = pgTable(
  "job_runs",
  {
    id: text("id").primaryKey(),
    name: text("name").notNull(),
    state: text("state", { enum: JOB_STATES }).notNull().default("queued"),
    attempts: integer("attempts").notNull().default(0),
    progress: real("progress").notNull().default(0),
    stage: text("stage"),
    error: text("error"),
    payload: jsonb("payload").$type<Record<string, unknown>>().notNull().default({}),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
  },
  (t) => [index("job_runs_name_state_idx").on(t.name, t.state)],
);

export type JobRun = typeof jobRuns.$inferSelect;

// Composites: one Sun-centred master made from two or more finished reductions
// of one eclipse (a long and a short lens of one observer, or several observers),
// reprojected onto one helioprojective grid and merged (lib/imaging/composite.ts).
// Like a reduction, a composite is a run with its parameters, state and outputs;
// its inputs are kept in order, and credit goes to each input's photographer.
import { index, integer, jsonb, pgTable, primaryKey, real, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { reductions } from "./reductions";
import { eclipses } from "./sky";

export const COMPOSITE_STATES = ["queued", "running", "done", "failed"] as const;
export type CompositeState = (typeof COMPOSITE_STATES)[number];

export interface CompositeParamsRecord {
  /** The composite's plate scale, arcsec per pixel; absent: the finest input's. */
  scaleArcsecPerPx?: number;
  /** Refine each input's WCS by phase correlation against the reference. */
  refine: boolean;
  filter: "mgn" | "nrgf";
}

export const composites = pgTable(
  "composites",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    eclipseId: text("eclipse_id")
      .notNull()
      .references(() => eclipses.id),
    /** Who composed it (processing credit); null once their account is gone. */
    composedBy: text("composed_by").references(() => users.id, { onDelete: "set null" }),
    title: text("title").notNull(),
    params: jsonb("params").$type<CompositeParamsRecord>().notNull(),
    state: text("state", { enum: COMPOSITE_STATES }).notNull().default("queued"),
    stage: text("stage"),
    progress: real("progress").notNull().default(0),
    error: text("error"),
    pipelineVersion: text("pipeline_version"),
    /** Object keys of the outputs by role (master, natural, structure, previews, contribution, report, tiles prefix). */
    outputs: jsonb("outputs").$type<Record<string, string>>(),
    /** report.json: grid, inputs (factors, refinements, shares), figures and timings. */
    measurements: jsonb("measurements").$type<Record<string, unknown>>(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { withTimezone: true }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
  },
  (t) => [index("composites_composed_by_idx").on(t.composedBy), index("composites_eclipse_idx").on(t.eclipseId)],
);

export const compositeInputs = pgTable(
  "composite_inputs",
  {
    compositeId: uuid("composite_id")
      .notNull()
      .references(() => composites.id, { onDelete: "cascade" }),
    /** Its place among the inputs (0 first), as the composite's report lists them. */
    position: integer("position").notNull(),
    // A reduction in a composite is not deleted from under it: its set's deletion is refused until the composite goes.
    reductionId: uuid("reduction_id")
      .notNull()
      .references(() => reductions.id, { onDelete: "restrict" }),
  },
  (t) => [primaryKey({ columns: [t.compositeId, t.position] }), index("composite_inputs_reduction_idx").on(t.reductionId)],
);

export type Composite = typeof composites.$inferSelect;

// Outgoing mail. A message is written here first and a job carrying only its id
// sends it, so a retry never sends a different text and nothing is lost if
// Redis or SMTP is down for a moment.
import { index, pgTable, text, timestamp } from "drizzle-orm/pg-core";

export const OUTBOX_STATES = ["pending", "sent", "failed"] as const;

export const outboxMessages = pgTable(
  "outbox_messages",
  {
    id: text("id").primaryKey(),
    to: text("to").notNull(),
    subject: text("subject").notNull(),
    text: text("text").notNull(),
    html: text("html"),
    state: text("state", { enum: OUTBOX_STATES }).notNull().default("pending"),
    error: text("error"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    sentAt: timestamp("sent_at", { withTimezone: true }),
  },
  (t) => [index("outbox_messages_state_idx").on(t.state)],
);

export type OutboxMessage = typeof outboxMessages.$inferSelect;

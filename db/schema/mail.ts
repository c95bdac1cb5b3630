import { index, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";

/** Messages caught by the local fake SMTP server (only when SMTP_URL is unset, never in production). */
export const outboxMessages = pgTable(
  "outbox_messages",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    fromAddress: text("from_address").notNull(),
    toAddresses: text("to_addresses").array().notNull(),
    subject: text("subject").notNull(),
    text: text("text").notNull(),
    html: text("html"),
    receivedAt: timestamp("received_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("outbox_received_idx").on(t.receivedAt)],
);

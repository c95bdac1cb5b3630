import { index, pgTable, primaryKey, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { users } from "./accounts";
import { studies } from "./studies";

/**
 * A person's named key for scripts (`Authorization: Bearer ...`). Only a SHA-256 of the key is
 * kept; `prefix` (the key's first characters) lets a person tell keys apart. It expires, can be
 * revoked, and works only in the studies listed in api_token_studies.
 */
export const apiTokens = pgTable(
  "api_tokens",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: uuid("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    tokenHash: text("token_hash").notNull().unique(),
    prefix: text("prefix").notNull(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("api_tokens_user_idx").on(t.userId)],
);

/** The studies a token works in, each with the highest role it may act with there. */
export const apiTokenStudies = pgTable(
  "api_token_studies",
  {
    tokenId: uuid("token_id").notNull().references(() => apiTokens.id, { onDelete: "cascade" }),
    studyId: uuid("study_id").notNull().references(() => studies.id, { onDelete: "cascade" }),
    role: text("role").notNull(),
  },
  (t) => [primaryKey({ columns: [t.tokenId, t.studyId] })],
);

/**
 * Per-user API tokens for the headless API (pit laptops, scripts), each scoped to one team. Only a
 * SHA-256 of the token is stored; the token itself is shown once. See app/server/api-tokens.server.ts.
 */
import { char, index, mysqlTable, timestamp, varchar } from "drizzle-orm/mysql-core";
import { organization, user } from "./auth";

export const apiTokens = mysqlTable(
  "api_tokens",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    userId: varchar("user_id", { length: 36 })
      .notNull()
      .references(() => user.id, { onDelete: "cascade" }),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 80 }).notNull(),
    tokenHash: char("token_hash", { length: 64 }).notNull().unique(),
    /** The token's first characters, so a list can tell tokens apart without the secret. */
    tokenPrefix: varchar("token_prefix", { length: 16 }).notNull(),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
    lastUsedAt: timestamp("last_used_at", { fsp: 3 }),
    revokedAt: timestamp("revoked_at", { fsp: 3 }),
  },
  (t) => [index("api_tokens_user_idx").on(t.userId)],
);

export type ApiToken = typeof apiTokens.$inferSelect;

/**
 * Brief links: a read-only view of one session, or of one saved comparison, for a driver, opened without
 * signing in. The token is shown once and only its SHA-256 is stored; a link expires, can be revoked, and
 * counts its views. Exactly one of session_id and comparison_id is set (a check constraint holds it).
 */
import { sql } from "drizzle-orm";
import { char, check, index, int, mysqlTable, timestamp, uniqueIndex, varchar } from "drizzle-orm/mysql-core";
import { organization, user } from "./auth";
import { jsonText } from "./garage";
import { savedComparisons } from "./report";
import { analysisSessions } from "./sessions";

export const briefLinks = mysqlTable(
  "brief_links",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    sessionId: varchar("session_id", { length: 36 }).references(() => analysisSessions.id, { onDelete: "cascade" }),
    /** A saved comparison instead of one session: the brief shows what the comparison holds when opened. */
    comparisonId: varchar("comparison_id", { length: 36 }).references(() => savedComparisons.id, { onDelete: "cascade" }),
    /** The comparison's sessions when the link was made: saving the comparison again with others later does not widen what the link shows. */
    comparisonSessionIds: jsonText<string[]>()("comparison_session_ids"),
    /** SHA-256 (hex) of the token in the link; the token itself is never stored. */
    tokenHash: char("token_hash", { length: 64 }).notNull(),
    note: varchar("note", { length: 500 }),
    /** Whom it was sent to: a member of the team (their dashboard lists it) and/or an e-mail address. */
    recipientUserId: varchar("recipient_user_id", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    recipientEmail: varchar("recipient_email", { length: 255 }),
    expiresAt: timestamp("expires_at", { fsp: 3 }).notNull(),
    revokedAt: timestamp("revoked_at", { fsp: 3 }),
    viewCount: int("view_count").notNull().default(0),
    lastViewedAt: timestamp("last_viewed_at", { fsp: 3 }),
    createdBy: varchar("created_by", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex("brief_links_token_hash_idx").on(t.tokenHash),
    index("brief_links_team_idx").on(t.teamId, t.createdAt),
    index("brief_links_recipient_idx").on(t.recipientUserId),
    check("brief_links_one_subject", sql`(session_id is null) <> (comparison_id is null)`),
  ],
);

export type BriefLink = typeof briefLinks.$inferSelect;

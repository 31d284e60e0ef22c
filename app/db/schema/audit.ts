/**
 * Audit log: who did what to a team's data, and when. One row per event, written in the same transaction
 * as the change it records (recordAudit in app/server/audit.server.ts), read by the team's owner.
 * Rows go when the team goes; a member who leaves or deletes their account stays as "a former member"
 * (actor set to null) so the history keeps its events.
 */
import { index, mysqlTable, timestamp, varchar } from "drizzle-orm/mysql-core";
import { organization, user } from "./auth";
import { jsonText } from "./garage";

export type AuditDetail = Record<string, string | number | boolean | null>;

export const auditLog = mysqlTable(
  "audit_log",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    /** Null for an anonymous actor (a Brief link holder) or a member whose account is gone. */
    actorUserId: varchar("actor_user_id", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    /** short snake_case: session_uploaded, setup_version_created, member_role_changed, brief_viewed, … */
    action: varchar("action", { length: 64 }).notNull(),
    subjectType: varchar("subject_type", { length: 32 }).notNull(),
    subjectId: varchar("subject_id", { length: 64 }).notNull(),
    /** A few words of context (names, old and new values), never secrets. */
    detail: jsonText<AuditDetail>()("detail"),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
  },
  (t) => [index("audit_log_team_created_idx").on(t.teamId, t.createdAt), index("audit_log_team_subject_idx").on(t.teamId, t.subjectType, t.subjectId)],
);

export type AuditRow = typeof auditLog.$inferSelect;

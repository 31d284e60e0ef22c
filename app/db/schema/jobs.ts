/**
 * Background jobs, shared by every app and job-worker process through MariaDB (no per-process
 * state). A worker claims the oldest due job with SELECT … FOR UPDATE SKIP LOCKED and holds a lease
 * that its heartbeat extends; a job whose lease runs out (its worker died) is claimed again, and a
 * result is written only by the lease's current owner, so no job is done twice.
 * See app/server/jobs.server.ts.
 */
import { bigint, index, int, mysqlEnum, mysqlTable, text, timestamp, varchar } from "drizzle-orm/mysql-core";
import { organization } from "./auth";
import { jsonText } from "./garage";
import { analysisSessions } from "./sessions";

export const JOB_STATUSES = ["queued", "running", "done", "failed"] as const;
export type JobStatus = (typeof JOB_STATUSES)[number];

export const jobs = mysqlTable(
  "jobs",
  {
    id: bigint("id", { mode: "number", unsigned: true }).autoincrement().primaryKey(),
    /** What to do: "session_check" re-runs the engine on a session's stored raw file. */
    kind: varchar("kind", { length: 32 }).notNull(),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    sessionId: varchar("session_id", { length: 36 }).references(() => analysisSessions.id, { onDelete: "cascade" }),
    payload: jsonText<unknown>()("payload"),
    status: mysqlEnum("status", JOB_STATUSES).notNull().default("queued"),
    attempts: int("attempts").notNull().default(0),
    maxAttempts: int("max_attempts").notNull().default(3),
    runAfter: timestamp("run_after", { fsp: 3 }).notNull().defaultNow(),
    leaseOwner: varchar("lease_owner", { length: 80 }),
    leaseExpiresAt: timestamp("lease_expires_at", { fsp: 3 }),
    heartbeatAt: timestamp("heartbeat_at", { fsp: 3 }),
    error: text("error"),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { fsp: 3 }),
    finishedAt: timestamp("finished_at", { fsp: 3 }),
  },
  (t) => [index("jobs_status_due_idx").on(t.status, t.runAfter), index("jobs_lease_idx").on(t.status, t.leaseExpiresAt), index("jobs_session_idx").on(t.sessionId)],
);

export type Job = typeof jobs.$inferSelect;

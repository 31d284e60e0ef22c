/**
 * The job queue in MariaDB, shared by every app and job-worker process (see app/db/schema/jobs.ts).
 *
 *   enqueueJob(tx, { kind, teamId, sessionId, payload })   inside the transaction that makes the work
 *   claimJob(owner)          the oldest due job, or one whose lease ran out (its worker died), claimed with
 *                            SELECT … FOR UPDATE SKIP LOCKED so two workers never take the same row
 *   heartbeat(id, owner)     extends the lease; false when the lease was lost (another worker has the job)
 *   completeJob(id, owner, write)  runs `write` and marks the job done in one transaction, only while
 *                            `owner` still holds the lease: a result is written once, by the lease owner
 *   failJob(id, owner, message)    queued again with a back-off, or failed after max_attempts
 *
 * Times come from the database clock (NOW(3)), so processes with skewed clocks agree about leases.
 */
import { and, eq, inArray, sql } from "drizzle-orm";
import { jobs, type Job } from "../db/schema/jobs";
import { analysisSessions } from "../db/schema/sessions";
import type { DbOrTx } from "./audit.server";
import { db } from "./db.server";

/** Seconds a claimed job stays with its worker without a heartbeat (JOB_LEASE_S, default 60). */
export function leaseSeconds(): number {
  const n = Number(process.env.JOB_LEASE_S);
  return Number.isFinite(n) && n >= 1 ? n : 60;
}

export type JobKind = "session_check";

export async function enqueueJob(
  dbOrTx: DbOrTx,
  job: { kind: JobKind; teamId: string; sessionId?: string | null; payload?: unknown; maxAttempts?: number },
): Promise<number> {
  const [result] = await dbOrTx.insert(jobs).values({
    kind: job.kind,
    teamId: job.teamId,
    sessionId: job.sessionId ?? null,
    payload: job.payload ?? null,
    maxAttempts: job.maxAttempts ?? 3,
  });
  return Number((result as { insertId: number | bigint }).insertId);
}

export type ClaimedJob = Job & { attempt: number };

/** Claims one due job for `owner`, or null when there is none. `teamId` limits it to one team's jobs (tools, tests). */
export async function claimJob(owner: string, only: { teamId?: string } = {}): Promise<ClaimedJob | null> {
  const lease = leaseSeconds();
  const team = only.teamId ? sql`AND team_id = ${only.teamId}` : sql``;
  for (;;) {
    const outcome = await db.transaction(async (tx) => {
      const [rows] = (await tx.execute(sql`
        SELECT id, attempts, max_attempts AS maxAttempts, status, session_id AS sessionId
        FROM jobs
        WHERE ((status = 'queued' AND run_after <= NOW(3))
           OR (status = 'running' AND lease_expires_at < NOW(3))) ${team}
        ORDER BY run_after, id
        LIMIT 1
        FOR UPDATE SKIP LOCKED`)) as unknown as [Array<{ id: number; attempts: number; maxAttempts: number; status: string; sessionId: string | null }>];
      const row = rows[0];
      if (!row) return { kind: "none" as const };
      if (row.status === "running" && row.attempts >= row.maxAttempts) {
        // Its worker died on the last allowed attempt: give up and say so.
        const why = `The worker running this job stopped without finishing it, ${row.attempts === 1 ? "on its only attempt" : `on all ${row.attempts} attempts`} (a worker killed, or the database lost mid-job).`;
        await tx.update(jobs).set({ status: "failed", error: why, leaseOwner: null, finishedAt: sql`NOW(3)` }).where(eq(jobs.id, row.id));
        await flagUnchecked(tx, row.sessionId, why);
        return { kind: "gave_up" as const };
      }
      await tx
        .update(jobs)
        .set({
          status: "running",
          attempts: sql`${jobs.attempts} + 1`,
          leaseOwner: owner,
          leaseExpiresAt: sql`NOW(3) + INTERVAL ${lease} SECOND`,
          heartbeatAt: sql`NOW(3)`,
          startedAt: sql`COALESCE(${jobs.startedAt}, NOW(3))`,
        })
        .where(eq(jobs.id, row.id));
      const [job] = await tx.select().from(jobs).where(eq(jobs.id, row.id));
      return { kind: "claimed" as const, job: { ...job, attempt: job.attempts } };
    });
    if (outcome.kind === "none") return null;
    if (outcome.kind === "claimed") return outcome.job;
  }
}

function affected(result: unknown): number {
  const header = Array.isArray(result) ? result[0] : result;
  return Number((header as { affectedRows?: number }).affectedRows ?? 0);
}

/** Extends the lease while the work goes on; false when this worker no longer holds it. */
export async function heartbeat(jobId: number, owner: string): Promise<boolean> {
  const result = await db
    .update(jobs)
    .set({ leaseExpiresAt: sql`NOW(3) + INTERVAL ${leaseSeconds()} SECOND`, heartbeatAt: sql`NOW(3)` })
    .where(and(eq(jobs.id, jobId), eq(jobs.leaseOwner, owner), eq(jobs.status, "running")));
  return affected(result) === 1;
}

type Tx = Parameters<Parameters<typeof db.transaction>[0]>[0];

/** A session whose re-check was given up keeps its first figures, flagged with the reason (never left "read" for ever). */
async function flagUnchecked(tx: DbOrTx, sessionId: string | null, why: string): Promise<void> {
  if (!sessionId) return;
  await tx
    .update(analysisSessions)
    .set({ status: "flagged", statusDetail: `The server could not re-check the stored file: ${why}`.slice(0, 2000), updatedAt: new Date() })
    .where(and(eq(analysisSessions.id, sessionId), inArray(analysisSessions.status, ["received", "read"])));
}

/**
 * Writes the job's result and marks it done, in one transaction, if `owner` still holds the lease
 * (the row is locked first, so a worker that lost its lease cannot write over the new owner's work).
 * Returns false, writing nothing, when the lease was lost.
 */
export async function completeJob(jobId: number, owner: string, write: (tx: Tx) => Promise<void>): Promise<boolean> {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .select({ id: jobs.id })
      .from(jobs)
      .where(and(eq(jobs.id, jobId), eq(jobs.leaseOwner, owner), eq(jobs.status, "running")))
      .for("update");
    if (!row) return false;
    await write(tx);
    // The lease owner stays on the row: which worker did the job.
    await tx.update(jobs).set({ status: "done", error: null, leaseExpiresAt: null, finishedAt: sql`NOW(3)` }).where(eq(jobs.id, jobId));
    return true;
  });
}

/** The job failed on this attempt: queued again after a back-off (10 s, 40 s, …), or failed for good. */
export async function failJob(jobId: number, owner: string, message: string, options: { retry?: boolean } = {}): Promise<boolean> {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .select({ attempts: jobs.attempts, maxAttempts: jobs.maxAttempts, sessionId: jobs.sessionId })
      .from(jobs)
      .where(and(eq(jobs.id, jobId), eq(jobs.leaseOwner, owner), eq(jobs.status, "running")))
      .for("update");
    if (!row) return false;
    const again = options.retry !== false && row.attempts < row.maxAttempts;
    const backoffS = 10 * 4 ** (row.attempts - 1);
    await tx
      .update(jobs)
      .set(
        again
          ? { status: "queued", error: message.slice(0, 2000), leaseOwner: null, leaseExpiresAt: null, runAfter: sql`NOW(3) + INTERVAL ${backoffS} SECOND` }
          : { status: "failed", error: message.slice(0, 2000), leaseOwner: null, leaseExpiresAt: null, finishedAt: sql`NOW(3)` },
      )
      .where(eq(jobs.id, jobId));
    if (!again) await flagUnchecked(tx, row.sessionId, message);
    return true;
  });
}

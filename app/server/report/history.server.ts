/**
 * A session's processing history for the Balance report: every stored result (browser reading, server
 * re-check, re-analysis), newest first, and the re-check or re-analysis job still waiting or running.
 */
import { and, desc, eq, inArray } from "drizzle-orm";
import { db } from "~/server/db.server";
import { jobs } from "~/db/schema/jobs";
import { sessionResults } from "~/db/schema/sessions";
import { setupSheets, setups } from "~/db/schema/garage";
import { user } from "~/db/schema/auth";

export interface ResultRow {
  id: string;
  origin: "browser" | "server";
  reason: string;
  engineVersion: string | null;
  setupVersion: number | null;
  differs: boolean;
  error: string | null;
  by: string | null;
  at: string;
}

export interface OpenJob {
  id: number;
  status: "queued" | "running";
  reason: string;
  attempts: number;
  since: string;
}

const HISTORY_LIMIT = 20;

export async function sessionHistory(teamId: string, sessionId: string): Promise<{ results: ResultRow[]; openJob: OpenJob | null }> {
  const [rows, open] = await Promise.all([
    db
      .select({
        id: sessionResults.id,
        origin: sessionResults.origin,
        reason: sessionResults.reason,
        engineVersion: sessionResults.engineVersion,
        setupVersion: setups.version,
        diff: sessionResults.diff,
        error: sessionResults.error,
        by: user.name,
        at: sessionResults.createdAt,
      })
      .from(sessionResults)
      .leftJoin(setups, eq(setups.id, sessionResults.setupId))
      .leftJoin(user, eq(user.id, sessionResults.createdBy))
      .where(and(eq(sessionResults.teamId, teamId), eq(sessionResults.sessionId, sessionId)))
      .orderBy(desc(sessionResults.createdAt))
      .limit(HISTORY_LIMIT),
    db
      .select({ id: jobs.id, status: jobs.status, payload: jobs.payload, attempts: jobs.attempts, createdAt: jobs.createdAt, startedAt: jobs.startedAt })
      .from(jobs)
      .where(and(eq(jobs.teamId, teamId), eq(jobs.sessionId, sessionId), inArray(jobs.status, ["queued", "running"])))
      .orderBy(desc(jobs.id))
      .limit(1),
  ]);
  const job = open[0];
  return {
    results: rows.map((r) => ({
      id: r.id,
      origin: r.origin,
      reason: r.reason,
      engineVersion: r.engineVersion,
      setupVersion: r.setupVersion ?? null,
      differs: hasDifferences(r.diff),
      error: r.error,
      by: r.by ?? null,
      at: r.at.toISOString(),
    })),
    openJob: job
      ? {
          id: job.id,
          status: job.status as "queued" | "running",
          reason: (job.payload as { reason?: string } | null)?.reason === "reanalysis" ? "reanalysis" : "recheck",
          attempts: job.attempts,
          since: (job.startedAt ?? job.createdAt).toISOString(),
        }
      : null,
  };
}

/** The re-check's diff (app/lib/sessions/summary-diff.ts: { differences, compared, truncated }) lists something. */
export function hasDifferences(diff: unknown): boolean {
  if (!diff) return false;
  const listed = (diff as { differences?: unknown }).differences;
  if (Array.isArray(listed)) return listed.length > 0 || (diff as { truncated?: boolean }).truncated === true;
  if (Array.isArray(diff)) return diff.length > 0;
  if (typeof diff === "object") return Object.keys(diff as object).length > 0;
  return true;
}

/** The setup versions of the session's car a re-analysis may name (a correction), newest first. */
export async function carSetupVersions(teamId: string, carId: string) {
  return db
    .select({ id: setups.id, sheetName: setupSheets.name, version: setups.version })
    .from(setups)
    .innerJoin(setupSheets, eq(setupSheets.id, setups.sheetId))
    .where(and(eq(setups.teamId, teamId), eq(setups.carId, carId)))
    .orderBy(setupSheets.name, desc(setups.version))
    .limit(50);
}

/**
 * The "session_check" job: the server runs the engine again on a session's stored raw file, with the
 * car and setup version the session names (corrected ones after a re-analysis) and the options stored
 * with it. Its summary becomes the summary of record; a new session_results row keeps the history. On
 * the re-check of a browser upload, a difference beyond rounding (app/lib/sessions/summary-diff.ts)
 * flags the session and the status detail says what differs. A file the engine refuses flags it too,
 * with the engine's message. The result is written only while the worker holds the job's lease.
 */
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { analysisSessions, rawUploads, sessionBands, sessionResults } from "~/db/schema/sessions";
import { validateCar } from "~/engine/car";
import { isEngineError } from "~/engine/errors";
import type { SessionSummary } from "~/engine/summary";
import type { SummaryOptions } from "~/engine/summary-options";
import type { CarInput, ChannelMap } from "~/engine/types";
import { bandRowsOf } from "~/lib/sessions/band-rows";
import { describeDiff, diffSummaries } from "~/lib/sessions/summary-diff";
import { recordAudit } from "../audit.server";
import { db } from "../db.server";
import { exportCarInput } from "../garage-io.server";
import { completeJob, enqueueJob, type ClaimedJob } from "../jobs.server";
import { withLocalFile } from "../storage.server";
import type { DbOrTx } from "../audit.server";

/** Runs the engine on a file on local disk (the job worker passes the threaded runner of scripts/lib/part-threads.ts). */
export type AnalyseFile = (path: string, car: CarInput, map: ChannelMap, options: SummaryOptions) => Promise<SessionSummary>;

export type CheckPayload = { reason: "recheck" | "reanalysis"; requestedBy?: string | null };

import { engineVersionOf as serverEngineVersion } from "~/lib/engine-version";
export { serverEngineVersion };

/** Queues a re-analysis of a session (after a car or setup correction, or a new engine); history is kept. */
export async function enqueueReanalysis(dbOrTx: DbOrTx, session: { id: string; teamId: string }, userId: string | null): Promise<number> {
  return enqueueJob(dbOrTx, { kind: "session_check", teamId: session.teamId, sessionId: session.id, payload: { reason: "reanalysis", requestedBy: userId } satisfies CheckPayload });
}

export type CheckOutcome = { written: boolean; status: "checked" | "flagged" | "gone"; detail: string };

export async function runSessionCheck(job: ClaimedJob, owner: string, analyseFile: AnalyseFile): Promise<CheckOutcome> {
  const payload = (job.payload ?? { reason: "recheck" }) as CheckPayload;
  const [session] = job.sessionId ? await db.select().from(analysisSessions).where(eq(analysisSessions.id, job.sessionId)) : [];
  if (!session) {
    // Deleted since it was queued: nothing to do.
    const written = await completeJob(job.id, owner, async () => undefined);
    return { written, status: "gone", detail: "The session no longer exists." };
  }
  const [raw] = session.rawUploadId ? await db.select().from(rawUploads).where(eq(rawUploads.id, session.rawUploadId)) : [];
  if (!raw) throw new Error(`session ${session.id} has no stored raw file`);

  const { car: carFile } = await exportCarInput(session.teamId, session.carId, session.setupId);
  const options = (session.analysisOptions ?? {}) as SummaryOptions;
  let summary: SessionSummary | null = null;
  let engineMessage: string | null = null;
  try {
    const car = validateCar(carFile);
    summary = await withLocalFile(raw.storage, raw.storageKey, (path) => analyseFile(path, car, session.channelMap as ChannelMap, options));
  } catch (error) {
    // An input problem is a result (the session is flagged with the engine's message), not a failed job.
    if (!isEngineError(error)) throw error;
    engineMessage = error.message;
  }

  const now = new Date();
  const reason = payload.reason === "reanalysis" ? "reanalysis" : "recheck";
  let status: "checked" | "flagged";
  let detail: string;
  let diff = null;
  if (!summary) {
    status = "flagged";
    detail = `The server could not read the stored file: ${engineMessage}`;
  } else if (reason === "recheck" && session.browserSummary) {
    diff = diffSummaries(session.browserSummary, stripTraces(summary));
    status = diff.differences.length ? "flagged" : "checked";
    detail = describeDiff(diff);
  } else {
    status = "checked";
    detail = reason === "reanalysis" ? "Re-analysed by the server from the stored file." : "Analysed by the server from the stored file.";
  }

  const written = await completeJob(job.id, owner, async (tx) => {
    await tx.insert(sessionResults).values({
      id: randomUUID(),
      sessionId: session.id,
      teamId: session.teamId,
      origin: "server",
      reason,
      engineVersion: summary ? serverEngineVersion(summary) : null,
      summaryVersion: summary?.summary_version ?? null,
      setupId: session.setupId,
      summary: summary ? stripTraces(summary) : null,
      options,
      diff,
      error: engineMessage,
      jobId: job.id,
      createdBy: payload.requestedBy ?? null,
      createdAt: now,
    });
    const update: Partial<typeof analysisSessions.$inferInsert> = { status, statusDetail: detail, recheckDiff: diff, checkedAt: now, updatedAt: now };
    if (summary) {
      // The server's run is the summary of record.
      Object.assign(update, { summary: stripTraces(summary), summaryVersion: summary.summary_version, traces: summary.traces ?? null, engineVersion: serverEngineVersion(summary) });
      await tx.delete(sessionBands).where(eq(sessionBands.sessionId, session.id));
      const bands = bandRowsOf(session.id, summary);
      if (bands.length) await tx.insert(sessionBands).values(bands);
    }
    await tx.update(analysisSessions).set(update).where(eq(analysisSessions.id, session.id));
    if (reason === "reanalysis") {
      await recordAudit(tx, { teamId: session.teamId, actorUserId: payload.requestedBy ?? null, action: "session_reanalysed", subjectType: "session", subjectId: session.id, detail: { result: status } });
    }
  });
  return { written, status, detail };
}

function stripTraces(summary: SessionSummary): Omit<SessionSummary, "traces"> {
  const { traces: _traces, ...rest } = summary;
  return rest;
}

/**
 * Re-analysis of a stored session: after a correction of its car or setup version (the wrong version
 * was picked, or the car's data were wrong and a new version now holds them), or after a new engine,
 * the job worker runs the engine again on the stored raw file. The session names the corrected version
 * at once; its figures change when the job is done, and every earlier result stays in session_results.
 */
import { and, eq, inArray } from "drizzle-orm";
import { z } from "zod";
import { jobs } from "~/db/schema/jobs";
import { setups } from "~/db/schema/garage";
import { analysisSessions } from "~/db/schema/sessions";
import { REANALYSIS_QUEUED_DETAIL } from "~/lib/sessions/status-words";
import { recordAudit } from "../audit.server";
import { db } from "../db.server";
import { enqueueReanalysis } from "../ingest/recheck.server";

export const reanalyseSchema = z.object({
  setupId: z.preprocess((v) => (v === "" || v === null ? undefined : v), z.string().trim().max(36).optional()),
});

export type ReanalyseOutcome = { ok: true; jobId: number; queuedAlready: boolean } | { ok: false; status: 404 | 422; error: string };

export async function requestReanalysis(teamId: string, userId: string, sessionId: string, change: z.infer<typeof reanalyseSchema>): Promise<ReanalyseOutcome> {
  return db.transaction(async (tx) => {
    const [session] = await tx
      .select({ id: analysisSessions.id, carId: analysisSessions.carId, setupId: analysisSessions.setupId, teamId: analysisSessions.teamId })
      .from(analysisSessions)
      .where(and(eq(analysisSessions.id, sessionId), eq(analysisSessions.teamId, teamId)))
      .for("update");
    if (!session) return { ok: false, status: 404, error: "No such session in this team." };
    let setupId = session.setupId;
    if (change.setupId && change.setupId !== session.setupId) {
      // A correction names another version of the same car: the raw file is that car's log.
      const [setup] = await tx.select({ id: setups.id, version: setups.version }).from(setups).where(and(eq(setups.id, change.setupId), eq(setups.teamId, teamId), eq(setups.carId, session.carId)));
      if (!setup) return { ok: false, status: 422, error: "That setup version is not one of this session's car." };
      setupId = setup.id;
    }
    const [open] = await tx
      .select({ id: jobs.id })
      .from(jobs)
      .where(and(eq(jobs.sessionId, session.id), inArray(jobs.status, ["queued"])))
      .limit(1);
    await tx
      .update(analysisSessions)
      .set({ setupId, statusDetail: REANALYSIS_QUEUED_DETAIL, updatedAt: new Date() })
      .where(eq(analysisSessions.id, session.id));
    const jobId = open ? open.id : await enqueueReanalysis(tx, session, userId);
    if (open) {
      // The queued job runs with what the session names when it starts; make it a re-analysis.
      await tx.update(jobs).set({ payload: { reason: "reanalysis", requestedBy: userId } }).where(eq(jobs.id, open.id));
    }
    await recordAudit(tx, {
      teamId,
      actorUserId: userId,
      action: "session_reanalysis_requested",
      subjectType: "session",
      subjectId: session.id,
      detail: setupId !== session.setupId ? { setupChanged: "yes" } : { setupChanged: "no" },
    });
    return { ok: true, jobId, queuedAlready: Boolean(open) };
  });
}

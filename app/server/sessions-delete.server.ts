/**
 * Deleting a session (issue 12 item 3): its rows (bands, results of every analysis, jobs: by the foreign
 * keys' cascade), its raw upload row and, once those are gone, its raw file in storage. The rows go in one
 * transaction with the audit event; the file is removed after the commit, so a failed transaction never
 * leaves a session without its file. A file that cannot be removed then is logged with its key (the
 * session is gone either way; the key names nothing but a random id).
 */
import { and, eq } from "drizzle-orm";
import { data } from "react-router";
import { analysisSessions, rawUploads } from "../db/schema/sessions";
import { recordAudit } from "./audit.server";
import { db } from "./db.server";
import { deleteObject, type StorageKind } from "./storage.server";

export type SessionDeleted = { sessionId: string; name: string; fileRemoved: boolean };

export async function deleteSession(teamId: string, userId: string | null, sessionId: string): Promise<SessionDeleted> {
  const found = await db.transaction(async (tx) => {
    const [session] = await tx
      .select({ id: analysisSessions.id, name: analysisSessions.name, rawUploadId: analysisSessions.rawUploadId, rawFileName: analysisSessions.rawFileName })
      .from(analysisSessions)
      .where(and(eq(analysisSessions.teamId, teamId), eq(analysisSessions.id, sessionId)))
      .for("update");
    if (!session) throw data("No such session in this team.", { status: 404 });
    const uploads = await tx
      .select({ id: rawUploads.id, storage: rawUploads.storage, key: rawUploads.storageKey })
      .from(rawUploads)
      .where(and(eq(rawUploads.teamId, teamId), session.rawUploadId ? eq(rawUploads.id, session.rawUploadId) : eq(rawUploads.sessionId, sessionId)));
    await tx.delete(analysisSessions).where(eq(analysisSessions.id, sessionId));
    for (const upload of uploads) await tx.delete(rawUploads).where(eq(rawUploads.id, upload.id));
    await recordAudit(tx, {
      teamId,
      actorUserId: userId,
      action: "session_deleted",
      subjectType: "session",
      subjectId: sessionId,
      detail: { session: session.name, file: session.rawFileName ?? null },
    });
    return { session, uploads };
  });
  let fileRemoved = true;
  for (const upload of found.uploads) {
    try {
      await deleteObject(upload.storage as StorageKind, upload.key);
    } catch (error) {
      fileRemoved = false;
      console.error(`[rakeline] session ${sessionId} deleted, but its raw file ${upload.storage}:${upload.key} could not be removed:`, error);
    }
  }
  return { sessionId, name: found.session.name, fileRemoved };
}

/**
 * raw_uploads rows: a stored file waiting for its session form (the Drop a log page uploads the file
 * while the engineer confirms the map and details). The same file sent again in the same team is
 * found by its SHA-256: its waiting row is reused, and a session already made from it is offered.
 */
import { randomUUID } from "node:crypto";
import { and, eq, inArray, sql } from "drizzle-orm";
import { rawUploads, type RawUpload } from "~/db/schema/sessions";
import { db } from "../db.server";
import { deleteObject, type StoredObject } from "../storage.server";
import { findSessionByHash } from "./store.server";

export type UploadAnswer = {
  upload: { id: string; fileName: string; bytes: number; sha256: string };
  duplicate: { id: string; url: string } | null;
};

/** Records a stored file for the team; a second copy of a file already waiting is deleted and the first row answered. */
export async function registerUpload(team: { id: string; slug: string }, userId: string, file: StoredObject & { fileName: string }): Promise<UploadAnswer> {
  try {
    const duplicate = await findSessionByHash(team.id, team.slug, file.sha256);
    const [waiting] = await db
      .select()
      .from(rawUploads)
      .where(and(eq(rawUploads.teamId, team.id), eq(rawUploads.sha256, file.sha256), eq(rawUploads.status, "stored")))
      .limit(1);
    if (waiting) {
      await deleteObject(file.storage, file.key).catch(() => undefined);
      return { upload: { id: waiting.id, fileName: file.fileName, bytes: waiting.bytes, sha256: waiting.sha256 }, duplicate };
    }
    const id = randomUUID();
    await db.insert(rawUploads).values({
      id,
      teamId: team.id,
      userId,
      storage: file.storage,
      storageKey: file.key,
      fileName: file.fileName,
      sha256: file.sha256,
      bytes: file.bytes,
      status: "stored",
      createdAt: new Date(),
    });
    return { upload: { id, fileName: file.fileName, bytes: file.bytes, sha256: file.sha256 }, duplicate };
  } catch (error) {
    // No row points at the file: remove it, so a failed request leaves nothing behind.
    await deleteObject(file.storage, file.key).catch(() => undefined);
    throw error;
  }
}

export async function getWaitingUpload(teamId: string, uploadId: string): Promise<RawUpload | null> {
  const [row] = await db.select().from(rawUploads).where(and(eq(rawUploads.id, uploadId), eq(rawUploads.teamId, teamId))).limit(1);
  return row ?? null;
}

/**
 * Removes uploads that never became a session (the page was closed before the details were sent) once
 * they are older than `olderThanHours`: the rows first (claimed with SKIP LOCKED, so two workers never
 * take the same ones), then their files. Returns how many were removed.
 */
export async function sweepStaleUploads(olderThanHours = 24, limit = 100): Promise<number> {
  const gone = await db.transaction(async (tx) => {
    const [rows] = (await tx.execute(sql`
      SELECT id, storage, storage_key AS storageKey FROM raw_uploads
      WHERE status = 'stored' AND created_at < NOW(3) - INTERVAL ${olderThanHours} HOUR
      ORDER BY created_at LIMIT ${limit}
      FOR UPDATE SKIP LOCKED`)) as unknown as [Array<{ id: string; storage: "fs" | "s3"; storageKey: string }>];
    if (rows.length) await tx.delete(rawUploads).where(and(inArray(rawUploads.id, rows.map((r) => r.id)), eq(rawUploads.status, "stored")));
    return rows;
  });
  for (const row of gone) await deleteObject(row.storage, row.storageKey).catch(() => undefined);
  return gone.length;
}

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

/** A stored file recorded for the team: its row, and whether that row was already waiting (a copy sent before). */
export type RecordedUpload = { row: RawUpload; reused: boolean };

/**
 * Records a stored file for the team right after it is stored (so no file lives long without a row);
 * a second copy of a file already waiting is deleted and the first row returned. On failure the new
 * file is removed and the error thrown.
 */
export async function recordUpload(teamId: string, userId: string, file: StoredObject & { fileName: string }): Promise<RecordedUpload> {
  try {
    const [waiting] = await db
      .select()
      .from(rawUploads)
      .where(and(eq(rawUploads.teamId, teamId), eq(rawUploads.sha256, file.sha256), eq(rawUploads.status, "stored")))
      .limit(1);
    if (waiting) {
      if (waiting.storageKey !== file.key) await deleteObject(file.storage, file.key).catch(() => undefined);
      return { row: waiting, reused: true };
    }
    const row: RawUpload = {
      id: randomUUID(),
      teamId,
      userId,
      storage: file.storage,
      storageKey: file.key,
      fileName: file.fileName,
      sha256: file.sha256,
      bytes: file.bytes,
      status: "stored",
      sessionId: null,
      createdAt: new Date(),
    };
    await db.insert(rawUploads).values(row);
    return { row, reused: false };
  } catch (error) {
    // No row points at the file: remove it, so a failed request leaves nothing behind.
    await deleteObject(file.storage, file.key).catch(() => undefined);
    throw error;
  }
}

/** Removes an upload that is still waiting (row, then file); used when the request that made it fails. */
export async function discardWaitingUpload(row: RawUpload): Promise<void> {
  const result = await db.delete(rawUploads).where(and(eq(rawUploads.id, row.id), eq(rawUploads.status, "stored")));
  if (Number((result[0] as { affectedRows?: number }).affectedRows ?? 0) === 1) await deleteObject(row.storage, row.storageKey).catch(() => undefined);
}

/** The Drop a log page's upload: recorded, with the session already made from the same file offered. */
export async function registerUpload(team: { id: string; slug: string }, userId: string, file: StoredObject & { fileName: string }): Promise<UploadAnswer> {
  const { row } = await recordUpload(team.id, userId, file);
  const duplicate = await findSessionByHash(team.id, team.slug, file.sha256);
  return { upload: { id: row.id, fileName: file.fileName, bytes: row.bytes, sha256: row.sha256 }, duplicate };
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

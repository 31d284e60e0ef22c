/** Notes on sessions and bands, and saved comparisons: team-scoped reads and audited writes. */
import { randomUUID } from "node:crypto";
import { and, asc, desc, eq, inArray } from "drizzle-orm";
import { db } from "~/server/db.server";
import { recordAudit } from "~/server/audit.server";
import { savedComparisons, sessionAnnotations } from "~/db/schema/report";
import { analysisSessions } from "~/db/schema/sessions";
import { user } from "~/db/schema/auth";

export async function listAnnotations(teamId: string, sessionIds: string[]) {
  if (sessionIds.length === 0) return [];
  const rows = await db
    .select({
      id: sessionAnnotations.id,
      sessionId: sessionAnnotations.sessionId,
      bandMinKmh: sessionAnnotations.bandMinKmh,
      bandMaxKmh: sessionAnnotations.bandMaxKmh,
      body: sessionAnnotations.body,
      author: user.name,
      authorId: sessionAnnotations.createdBy,
      createdAt: sessionAnnotations.createdAt,
    })
    .from(sessionAnnotations)
    .leftJoin(user, eq(user.id, sessionAnnotations.createdBy))
    .where(and(eq(sessionAnnotations.teamId, teamId), inArray(sessionAnnotations.sessionId, sessionIds)))
    .orderBy(asc(sessionAnnotations.createdAt));
  return rows.map((r) => ({ ...r, createdAt: r.createdAt.toISOString() }));
}

/** Adds a note; the caller has checked the session is the team's and the band is one of its bands. */
export async function addAnnotation(teamId: string, userId: string, sessionId: string, body: string, band: [number, number] | null) {
  const id = randomUUID();
  await db.transaction(async (tx) => {
    const [own] = await tx.select({ id: analysisSessions.id }).from(analysisSessions).where(and(eq(analysisSessions.teamId, teamId), eq(analysisSessions.id, sessionId))).limit(1);
    if (!own) throw new Error("addAnnotation: session not in team");
    await tx.insert(sessionAnnotations).values({ id, teamId, sessionId, bandMinKmh: band?.[0] ?? null, bandMaxKmh: band?.[1] ?? null, body, createdBy: userId });
    await recordAudit(tx, { teamId, actorUserId: userId, action: "session_annotated", subjectType: "session", subjectId: sessionId, detail: { band: band ? `${band[0]}–${band[1]} km/h` : "whole session" } });
  });
  return id;
}

export type NoteChange = "done" | "not_found" | "not_yours";

/**
 * Edits or deletes a note: its author may, and so may the team's owner (who keeps the team's records
 * tidy). Another team's note, or one on another session, is "not found". Audited in the same transaction.
 */
export async function changeAnnotation(
  teamId: string,
  actor: { userId: string; isOwner: boolean },
  sessionId: string,
  noteId: string,
  change: { body: string } | "delete",
): Promise<NoteChange> {
  return db.transaction(async (tx) => {
    const [note] = await tx
      .select({ id: sessionAnnotations.id, createdBy: sessionAnnotations.createdBy, bandMinKmh: sessionAnnotations.bandMinKmh, bandMaxKmh: sessionAnnotations.bandMaxKmh })
      .from(sessionAnnotations)
      .where(and(eq(sessionAnnotations.teamId, teamId), eq(sessionAnnotations.sessionId, sessionId), eq(sessionAnnotations.id, noteId)))
      .for("update");
    if (!note) return "not_found";
    if (note.createdBy !== actor.userId && !actor.isOwner) return "not_yours";
    const where = note.bandMinKmh === null ? "whole session" : `${note.bandMinKmh}–${note.bandMaxKmh} km/h`;
    const detail = { band: where, ownNote: note.createdBy === actor.userId ? "yes" : "no" };
    if (change === "delete") {
      await tx.delete(sessionAnnotations).where(eq(sessionAnnotations.id, note.id));
      await recordAudit(tx, { teamId, actorUserId: actor.userId, action: "annotation_deleted", subjectType: "session", subjectId: sessionId, detail });
    } else {
      await tx.update(sessionAnnotations).set({ body: change.body }).where(eq(sessionAnnotations.id, note.id));
      await recordAudit(tx, { teamId, actorUserId: actor.userId, action: "annotation_edited", subjectType: "session", subjectId: sessionId, detail });
    }
    return "done";
  });
}

export async function listSavedComparisons(teamId: string) {
  return db
    .select({ id: savedComparisons.id, name: savedComparisons.name, sessionIds: savedComparisons.sessionIds, createdAt: savedComparisons.createdAt })
    .from(savedComparisons)
    .where(eq(savedComparisons.teamId, teamId))
    .orderBy(desc(savedComparisons.createdAt))
    .limit(50);
}

/** Saves (or, under the same name, replaces) a comparison; the caller has checked every id is the team's. */
export async function saveComparison(teamId: string, userId: string, name: string, sessionIds: string[]) {
  await db.transaction(async (tx) => {
    const [existing] = await tx.select({ id: savedComparisons.id }).from(savedComparisons).where(and(eq(savedComparisons.teamId, teamId), eq(savedComparisons.name, name))).limit(1);
    const id = existing?.id ?? randomUUID();
    if (existing) await tx.update(savedComparisons).set({ sessionIds, createdBy: userId, createdAt: new Date() }).where(eq(savedComparisons.id, id));
    else await tx.insert(savedComparisons).values({ id, teamId, name, sessionIds, createdBy: userId });
    await recordAudit(tx, { teamId, actorUserId: userId, action: "comparison_saved", subjectType: "comparison", subjectId: id, detail: { name, sessions: sessionIds.length } });
  });
}

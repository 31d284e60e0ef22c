/**
 * Leaving a team, deleting a team and deleting an account (issue 12 item 3). Each refuses with a plain
 * message (400) when it would leave a team without an owner, changes its rows in one transaction, and
 * removes raw files from storage only after that transaction has committed.
 */
import { and, count, eq, ne } from "drizzle-orm";
import { data } from "react-router";
import { verifyPassword } from "better-auth/crypto";
import { account, member, organization, user } from "../db/schema/auth";
import { analysisSessions, rawUploads } from "../db/schema/sessions";
import { recordAudit } from "./audit.server";
import { db } from "./db.server";
import { deleteObject, type StorageKind } from "./storage.server";

async function ownersOf(teamId: string, exceptUserId?: string): Promise<number> {
  const where = [eq(member.organizationId, teamId), eq(member.role, "owner")];
  if (exceptUserId) where.push(ne(member.userId, exceptUserId));
  const [row] = await db.select({ n: count() }).from(member).where(and(...where));
  return Number(row?.n ?? 0);
}

/** The member leaves; the last owner cannot (someone else must hold the team first). */
export async function leaveTeam(teamId: string, teamName: string, userId: string, role: string): Promise<void> {
  if (role === "owner" && (await ownersOf(teamId, userId)) === 0)
    throw data(`You are the only owner of ${teamName}: make another member owner first, or delete the team.`, { status: 400 });
  await db.transaction(async (tx) => {
    await tx.delete(member).where(and(eq(member.organizationId, teamId), eq(member.userId, userId)));
    await recordAudit(tx, { teamId, actorUserId: userId, action: "member_left", subjectType: "member", subjectId: userId, detail: { role } });
  });
}

/**
 * Deletes the team and everything it owns (sessions first: they hold cars and setups by a restricting key;
 * the rest goes by the keys' cascade), then the raw files. `confirmSlug` must be the team's address.
 */
export async function deleteTeam(team: { id: string; slug: string; name: string }, confirmSlug: string): Promise<{ filesRemoved: number; filesLeft: number }> {
  if (confirmSlug.trim() !== team.slug) throw data(`Type the team's address, ${team.slug}, to confirm.`, { status: 400 });
  const files = await db.transaction(async (tx) => {
    const uploads = await tx.select({ storage: rawUploads.storage, key: rawUploads.storageKey }).from(rawUploads).where(eq(rawUploads.teamId, team.id));
    await tx.delete(analysisSessions).where(eq(analysisSessions.teamId, team.id));
    await tx.delete(organization).where(eq(organization.id, team.id));
    return uploads;
  });
  let filesLeft = 0;
  for (const file of files) {
    try {
      await deleteObject(file.storage as StorageKind, file.key);
    } catch (error) {
      filesLeft++;
      console.error(`[rakeline] team ${team.id} deleted, but raw file ${file.storage}:${file.key} could not be removed:`, error);
    }
  }
  return { filesRemoved: files.length - filesLeft, filesLeft };
}

/** Teams in which the user is the only owner while others remain: the account cannot go before them. */
export async function teamsHeldOnlyBy(userId: string): Promise<Array<{ id: string; name: string; members: number }>> {
  const mine = await db
    .select({ id: organization.id, name: organization.name, role: member.role })
    .from(member)
    .innerJoin(organization, eq(organization.id, member.organizationId))
    .where(eq(member.userId, userId));
  const out = [];
  for (const team of mine) {
    if (team.role !== "owner" || (await ownersOf(team.id, userId)) > 0) continue;
    const [others] = await db.select({ n: count() }).from(member).where(and(eq(member.organizationId, team.id), ne(member.userId, userId)));
    out.push({ id: team.id, name: team.name, members: Number(others?.n ?? 0) });
  }
  return out;
}

/**
 * Deletes the account after checking the password. A team the user alone owns with other members blocks
 * it (those members would be left without an owner); a team of which the user is the only member is
 * deleted with the account. Their events stay in the other teams' audit logs as "a former member".
 */
export async function deleteAccount(userId: string, password: string): Promise<void> {
  const [credential] = await db.select({ hash: account.password }).from(account).where(and(eq(account.userId, userId), eq(account.providerId, "credential")));
  if (!credential?.hash || !(await verifyPassword({ hash: credential.hash, password })))
    throw data("That password is not right; the account was not deleted.", { status: 400 });
  const held = await teamsHeldOnlyBy(userId);
  const blocking = held.filter((t) => t.members > 0);
  if (blocking.length)
    throw data(`You are the only owner of ${blocking.map((t) => t.name).join(", ")}: make another member owner (or delete the team) first.`, { status: 400 });
  for (const team of held) {
    const [row] = await db.select({ id: organization.id, slug: organization.slug, name: organization.name }).from(organization).where(eq(organization.id, team.id));
    if (row) await deleteTeam(row, row.slug);
  }
  await db.transaction(async (tx) => {
    const teams = await tx.select({ teamId: member.organizationId, role: member.role }).from(member).where(eq(member.userId, userId));
    for (const t of teams)
      await recordAudit(tx, { teamId: t.teamId, actorUserId: null, action: "account_deleted", subjectType: "member", subjectId: userId, detail: { role: t.role } });
    // Members, sessions of better-auth, credentials and tokens go by cascade; authorship becomes null.
    await tx.delete(user).where(eq(user.id, userId));
  });
}

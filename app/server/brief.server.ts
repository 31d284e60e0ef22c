/**
 * Brief links (issue 12 item 1): an engineer or owner shares one session, or one saved comparison, read-only
 * with a driver. The token
 * is 32 random bytes (256 bits, base64url) shown once in the link; only its SHA-256 is stored, so a database
 * copy opens nothing. A link expires (14 days unless chosen otherwise), can be revoked, and counts its views.
 * Every change and every view is in the team's audit log.
 */
import { createHash, randomBytes, randomUUID } from "node:crypto";
import { and, desc, eq, gt, inArray, isNull, or, sql, type SQL } from "drizzle-orm";
import { data } from "react-router";
import { user } from "../db/schema/auth";
import { briefLinks } from "../db/schema/briefs";
import { analysisSessions } from "../db/schema/sessions";
import { savedComparisons } from "../db/schema/report";
import { organization } from "../db/schema/auth";
import { recordAudit } from "./audit.server";
import { db } from "./db.server";
import { env } from "./env.server";
import { sendMail } from "./mail.server";

import { BRIEF_MAX_DAYS } from "../lib/brief-words";
export { BRIEF_DEFAULT_DAYS, BRIEF_MAX_DAYS } from "../lib/brief-words";
const TOKEN = /^[A-Za-z0-9_-]{43}$/;

export const hashBriefToken = (token: string) => createHash("sha256").update(token).digest("hex");

export function briefUrl(token: string): string {
  return `${env.APP_URL.replace(/\/$/, "")}/brief/${token}`;
}

/** What a link shows: one session, or one saved comparison (exactly one of the two). */
export type NewBrief = { sessionId?: string | null; comparisonId?: string | null; note: string | null; days: number; recipientEmail: string | null };

/** The name and ids of what a new link will show, checked against the team; throws 404 / 400 like the page shows them. */
async function briefSubject(
  teamId: string,
  input: NewBrief,
): Promise<{ sessionId: string | null; comparisonId: string | null; comparisonSessionIds: string[] | null; name: string; kind: "session" | "comparison" }> {
  if (input.comparisonId) {
    const [comparison] = await db
      .select({ id: savedComparisons.id, name: savedComparisons.name, sessionIds: savedComparisons.sessionIds })
      .from(savedComparisons)
      .where(and(eq(savedComparisons.teamId, teamId), eq(savedComparisons.id, input.comparisonId)));
    if (!comparison) throw data("No such saved comparison in this team.", { status: 404 });
    const withFigures = await comparisonSessions(teamId, comparison.sessionIds);
    if (withFigures.length === 0) throw data("None of this comparison's sessions has figures, so there is nothing to brief.", { status: 400 });
    return { sessionId: null, comparisonId: comparison.id, comparisonSessionIds: comparison.sessionIds, name: comparison.name, kind: "comparison" };
  }
  const [session] = await db
    .select({ id: analysisSessions.id, name: analysisSessions.name, summary: analysisSessions.summary })
    .from(analysisSessions)
    .where(and(eq(analysisSessions.teamId, teamId), eq(analysisSessions.id, input.sessionId ?? "")));
  if (!session) throw data("No such session in this team.", { status: 404 });
  if (!session.summary) throw data("This session has no figures yet, so there is nothing to brief; wait until the log has been read.", { status: 400 });
  return { sessionId: session.id, comparisonId: null, comparisonSessionIds: null, name: session.name, kind: "session" };
}

/** A comparison's sessions that still exist in the team and have figures, in the comparison's order. */
async function comparisonSessions(teamId: string, ids: string[]) {
  if (ids.length === 0) return [];
  const rows = await db
    .select({ id: analysisSessions.id, name: analysisSessions.name, sessionDate: analysisSessions.sessionDate, summary: analysisSessions.summary })
    .from(analysisSessions)
    .where(and(eq(analysisSessions.teamId, teamId), inArray(analysisSessions.id, ids), sql`${analysisSessions.summary} is not null`));
  const byId = new Map(rows.map((r) => [r.id, r]));
  return ids.flatMap((id) => (byId.has(id) ? [byId.get(id)!] : []));
}

/** Creates a link; returns the token (the only time it exists outside the link). Mails it when an address is given. */
export async function createBrief(team: { id: string; name: string }, actor: { id: string; name: string }, input: NewBrief) {
  const subject = await briefSubject(team.id, input);
  const days = Math.min(Math.max(Math.round(input.days), 1), BRIEF_MAX_DAYS);
  const token = randomBytes(32).toString("base64url");
  const id = randomUUID();
  const expiresAt = new Date(Date.now() + days * 86_400_000);
  let recipientUserId: string | null = null;
  if (input.recipientEmail) {
    const [known] = await db.select({ id: user.id }).from(user).where(eq(user.email, input.recipientEmail));
    recipientUserId = known?.id ?? null;
  }
  await db.transaction(async (tx) => {
    await tx.insert(briefLinks).values({
      id,
      teamId: team.id,
      sessionId: subject.sessionId,
      comparisonId: subject.comparisonId,
      comparisonSessionIds: subject.comparisonSessionIds,
      tokenHash: hashBriefToken(token),
      note: input.note,
      recipientUserId,
      recipientEmail: input.recipientEmail,
      expiresAt,
      createdBy: actor.id,
      createdAt: new Date(),
    });
    await recordAudit(tx, {
      teamId: team.id,
      actorUserId: actor.id,
      action: "brief_created",
      subjectType: "brief",
      subjectId: id,
      detail: { [subject.kind]: subject.name, days, to: input.recipientEmail },
    });
  });
  if (input.recipientEmail) {
    await sendMail(briefMail(input.recipientEmail, actor.name, team.name, subject.kind === "comparison" ? `comparison “${subject.name}”` : subject.name, briefUrl(token), input.note, expiresAt));
    await recordAudit(db, { teamId: team.id, actorUserId: actor.id, action: "brief_mailed", subjectType: "brief", subjectId: id, detail: { to: input.recipientEmail } });
  }
  return { id, token, url: briefUrl(token), expiresAt };
}

function briefMail(to: string, from: string, team: string, session: string, url: string, note: string | null, expiresAt: Date) {
  const until = expiresAt.toISOString().slice(0, 10);
  const text = [
    `${from} (${team}) shared a driver brief with you: ${session}.`,
    note ? `\nNote: ${note}\n` : "",
    `Open it here (no sign-in needed; it works until ${until}):`,
    url,
    "",
    "The figures are estimates from logged data. Follow your series' technical regulations and have a qualified engineer confirm any change before it goes on the car.",
  ].join("\n");
  const esc = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
  const html = `<p>${esc(from)} (${esc(team)}) shared a driver brief with you: <strong>${esc(session)}</strong>.</p>${note ? `<p>Note: ${esc(note)}</p>` : ""}<p><a href="${esc(url)}">Open the brief</a> (no sign-in needed; it works until ${until}).</p><p>The figures are estimates from logged data. Follow your series' technical regulations and have a qualified engineer confirm any change before it goes on the car.</p>`;
  return { to, subject: `Driver brief: ${session}`, text, html };
}

export async function revokeBrief(teamId: string, actorId: string, briefId: string): Promise<void> {
  await db.transaction(async (tx) => {
    const [row] = await tx.select({ id: briefLinks.id, revokedAt: briefLinks.revokedAt }).from(briefLinks).where(and(eq(briefLinks.teamId, teamId), eq(briefLinks.id, briefId))).for("update");
    if (!row) throw data("No such Brief link in this team.", { status: 404 });
    if (row.revokedAt) return;
    await tx.update(briefLinks).set({ revokedAt: new Date() }).where(eq(briefLinks.id, briefId));
    await recordAudit(tx, { teamId, actorUserId: actorId, action: "brief_revoked", subjectType: "brief", subjectId: briefId });
  });
}

/** The team's links, newest first, with their session's name and state (never the token). */
export async function listBriefs(teamId: string) {
  const rows = await db
    .select({
      id: briefLinks.id,
      sessionId: briefLinks.sessionId,
      comparisonId: briefLinks.comparisonId,
      sessionName: sql<string>`coalesce(${analysisSessions.name}, ${savedComparisons.name})`,
      note: briefLinks.note,
      recipientEmail: briefLinks.recipientEmail,
      expiresAt: briefLinks.expiresAt,
      revokedAt: briefLinks.revokedAt,
      viewCount: briefLinks.viewCount,
      lastViewedAt: briefLinks.lastViewedAt,
      createdAt: briefLinks.createdAt,
      createdByName: user.name,
    })
    .from(briefLinks)
    .leftJoin(analysisSessions, eq(analysisSessions.id, briefLinks.sessionId))
    .leftJoin(savedComparisons, eq(savedComparisons.id, briefLinks.comparisonId))
    .leftJoin(user, eq(user.id, briefLinks.createdBy))
    .where(eq(briefLinks.teamId, teamId))
    .orderBy(desc(briefLinks.createdAt))
    .limit(200);
  const now = Date.now();
  return rows.map((r) => ({ ...r, kind: r.comparisonId ? ("comparison" as const) : ("session" as const), state: r.revokedAt ? ("revoked" as const) : r.expiresAt.getTime() <= now ? ("expired" as const) : ("live" as const) }));
}

/**
 * Opens a link: the one session's figures and the note, or null when the token is malformed, unknown,
 * revoked or expired (the page says the same for all four). Each opening counts as a view.
 */
export async function openBrief(token: string) {
  if (!TOKEN.test(token)) return null;
  return openWhere(eq(briefLinks.tokenHash, hashBriefToken(token)));
}

/** The same for a signed-in recipient opening a link listed on their dashboard (no token needed). */
export async function openBriefFor(recipient: { id: string; email: string }, briefId: string) {
  if (!/^[A-Za-z0-9-]{1,36}$/.test(briefId)) return null;
  return openWhere(and(eq(briefLinks.id, briefId), or(eq(briefLinks.recipientUserId, recipient.id), eq(briefLinks.recipientEmail, recipient.email)))!);
}

export type OpenedBrief =
  | { kind: "session"; sessionName: string; sessionDate: string | null; teamName: string; note: string | null; expiresAt: Date; summary: unknown }
  | {
      kind: "comparison";
      comparisonName: string;
      teamName: string;
      note: string | null;
      expiresAt: Date;
      sessions: { name: string; sessionDate: string | null; summary: unknown }[];
    };

async function openWhere(which: SQL): Promise<OpenedBrief | null> {
  const [row] = await db
    .select({
      brief: briefLinks,
      sessionName: analysisSessions.name,
      sessionDate: analysisSessions.sessionDate,
      summary: analysisSessions.summary,
      comparisonName: savedComparisons.name,
      comparisonSessionIds: savedComparisons.sessionIds,
      teamName: organization.name,
    })
    .from(briefLinks)
    .leftJoin(analysisSessions, eq(analysisSessions.id, briefLinks.sessionId))
    .leftJoin(savedComparisons, eq(savedComparisons.id, briefLinks.comparisonId))
    .innerJoin(organization, eq(organization.id, briefLinks.teamId))
    .where(and(which, isNull(briefLinks.revokedAt), gt(briefLinks.expiresAt, new Date())));
  if (!row) return null;
  let opened: OpenedBrief;
  if (row.brief.comparisonId) {
    // The sessions the comparison held when the link was made (a link from before that was stored: what it
    // holds now), of the link's own team; a session deleted since is left out.
    const ids = row.brief.comparisonSessionIds ?? row.comparisonSessionIds;
    if (row.comparisonName === null || !ids) return null;
    const sessions = await comparisonSessions(row.brief.teamId, ids);
    if (sessions.length === 0) return null;
    opened = {
      kind: "comparison",
      comparisonName: row.comparisonName,
      teamName: row.teamName,
      note: row.brief.note,
      expiresAt: row.brief.expiresAt,
      sessions: sessions.map((x) => ({ name: x.name, sessionDate: x.sessionDate, summary: x.summary })),
    };
  } else {
    if (row.sessionName === null) return null;
    opened = { kind: "session", sessionName: row.sessionName, sessionDate: row.sessionDate, teamName: row.teamName, note: row.brief.note, expiresAt: row.brief.expiresAt, summary: row.summary };
  }
  const now = new Date();
  const subject: Record<string, string> = opened.kind === "comparison" ? { comparison: opened.comparisonName } : { session: opened.sessionName };
  await db.transaction(async (tx) => {
    await tx.update(briefLinks).set({ viewCount: sql`${briefLinks.viewCount} + 1`, lastViewedAt: now }).where(eq(briefLinks.id, row.brief.id));
    await recordAudit(tx, { teamId: row.brief.teamId, actorUserId: null, action: "brief_viewed", subjectType: "brief", subjectId: row.brief.id, detail: subject });
  });
  return opened;
}

/** Live links shared with this user (by account or by their e-mail address), for their dashboard. */
let sharedWithStatement: ReturnType<typeof prepareSharedWith> | undefined;
function prepareSharedWith() {
  return db
    .select({
      id: briefLinks.id,
      sessionName: sql<string>`coalesce(${analysisSessions.name}, ${savedComparisons.name})`,
      note: briefLinks.note,
      expiresAt: briefLinks.expiresAt,
      teamName: organization.name,
      createdAt: briefLinks.createdAt,
    })
    .from(briefLinks)
    .leftJoin(analysisSessions, eq(analysisSessions.id, briefLinks.sessionId))
    .leftJoin(savedComparisons, eq(savedComparisons.id, briefLinks.comparisonId))
    .innerJoin(organization, eq(organization.id, briefLinks.teamId))
    .where(
      and(
        or(eq(briefLinks.recipientUserId, sql.placeholder("userId")), eq(briefLinks.recipientEmail, sql.placeholder("email"))),
        isNull(briefLinks.revokedAt),
        gt(briefLinks.expiresAt, sql.placeholder("now")),
      ),
    )
    .orderBy(desc(briefLinks.createdAt))
    .limit(50)
    .prepare();
}

/** Live Brief links sent to this user (by account or address), newest first: every dashboard reads it (prepared once). */
export async function briefsSharedWith(userId: string, email: string) {
  return (sharedWithStatement ??= prepareSharedWith()).execute({ userId, email, now: new Date() });
}

/** The team's saved comparisons, newest first, for the same picker. */
export async function briefableComparisons(teamId: string) {
  return db
    .select({ id: savedComparisons.id, name: savedComparisons.name, sessionIds: savedComparisons.sessionIds })
    .from(savedComparisons)
    .where(eq(savedComparisons.teamId, teamId))
    .orderBy(desc(savedComparisons.createdAt))
    .limit(100);
}

/** The team's sessions that have figures, newest first, for the "create a Brief link" picker. */
export async function briefableSessions(teamId: string) {
  return db
    .select({ id: analysisSessions.id, name: analysisSessions.name, sessionDate: analysisSessions.sessionDate })
    .from(analysisSessions)
    .where(and(eq(analysisSessions.teamId, teamId), sql`${analysisSessions.summary} is not null`))
    .orderBy(desc(analysisSessions.createdAt))
    .limit(200);
}

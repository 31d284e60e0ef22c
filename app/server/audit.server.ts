import { randomUUID } from "node:crypto";
import { and, desc, eq, lt, or, type SQL } from "drizzle-orm";
import { user } from "../db/schema/auth";
import { auditLog, type AuditDetail } from "../db/schema/audit";
import { db, type Db } from "./db.server";

// The team's audit log. Call recordAudit with the transaction that makes the change, so the event and the
// change are stored together or not at all:
//
//   await db.transaction(async (tx) => {
//     await tx.insert(setups).values(row);
//     await recordAudit(tx, { teamId, actorUserId: ctx.user.id, action: "setup_version_created",
//                             subjectType: "setup", subjectId: row.id, detail: { car: "Marlin SR2", version: 3 } });
//   });
//
// Actions are short snake_case verbs in the past tense (session_uploaded, session_deleted, session_reanalysed,
// setup_version_created, member_role_changed, brief_created, brief_revoked, brief_viewed, …); AUDIT_ACTIONS
// below lists the ones with words on the audit page. Detail holds a few plain values, never secrets.

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
export type DbOrTx = Db | Tx;

export type AuditEvent = {
  teamId: string;
  /** The signed-in user who acted; null for a Brief link holder or the system. */
  actorUserId: string | null;
  /** One of AUDIT_ACTIONS' keys: an action without words on the audit page does not compile. */
  action: AuditAction;
  subjectType: string;
  subjectId: string;
  detail?: AuditDetail;
};

const ACTION = /^[a-z][a-z0-9_]{1,63}$/;
const MAX_DETAIL_TEXT = 200;

/**
 * Words for the audit page, one entry per action the code records (recordAudit takes only these keys;
 * tests/server/audit-words.test.ts also scans the source). An old row whose action has since gone is
 * shown as its code.
 */
const ACTION_WORDS = {
  session_uploaded: "uploaded a session",
  session_deleted: "deleted a session",
  session_reanalysed: "re-analysed a session",
  car_created: "added a car",
  car_updated: "changed a car",
  car_deleted: "deleted a car",
  car_archived: "archived a car (sessions used it)",
  car_imported: "imported a car file",
  setup_version_created: "saved a setup version",
  setup_archived: "archived a setup version",
  setup_deleted: "deleted a setup version",
  member_invited: "invited a member",
  invitation_revoked: "revoked an invitation",
  member_joined: "joined the team",
  member_role_changed: "changed a member's role",
  member_removed: "removed a member",
  member_left: "left the team",
  account_deleted: "deleted their account",
  team_renamed: "renamed the team",
  team_exported: "exported the team's data",
  brief_created: "created a Brief link",
  brief_revoked: "revoked a Brief link",
  brief_viewed: "Brief link viewed",
  brief_mailed: "sent a Brief link by e-mail",
  session_reanalysis_requested: "asked for a session to be re-analysed",
  session_annotated: "added a note to a session",
  annotation_edited: "edited a note on a session",
  annotation_deleted: "deleted a note on a session",
  comparison_saved: "saved a comparison",
  venue_created: "added a venue",
  venue_updated: "changed a venue",
  venue_deleted: "removed a venue",
  api_token_created: "created an API token",
  api_token_revoked: "revoked an API token",
} as const satisfies Record<string, string>;

export type AuditAction = keyof typeof ACTION_WORDS;
export const AUDIT_ACTIONS: Readonly<Record<string, string>> = ACTION_WORDS;

function cleanDetail(detail: AuditDetail | undefined): AuditDetail | null {
  if (!detail) return null;
  const out: AuditDetail = {};
  for (const [key, value] of Object.entries(detail).slice(0, 20)) {
    out[key.slice(0, 40)] = typeof value === "string" ? value.slice(0, MAX_DETAIL_TEXT) : value;
  }
  return out;
}

/** Stores one event. Throws on a malformed action or ids (a programming error, not user input). */
export async function recordAudit(dbOrTx: DbOrTx, event: AuditEvent): Promise<void> {
  if (!ACTION.test(event.action)) throw new Error(`recordAudit: action "${event.action}" must be snake_case (a-z, 0-9, _)`);
  if (!event.teamId || !event.subjectType || !event.subjectId) throw new Error("recordAudit: teamId, subjectType and subjectId are required");
  await dbOrTx.insert(auditLog).values({
    id: randomUUID(),
    teamId: event.teamId,
    actorUserId: event.actorUserId,
    action: event.action,
    subjectType: event.subjectType.slice(0, 32),
    subjectId: event.subjectId.slice(0, 64),
    detail: cleanDetail(event.detail),
    createdAt: new Date(),
  });
}

export type AuditEntry = {
  id: string;
  at: Date;
  action: string;
  subjectType: string;
  subjectId: string;
  detail: AuditDetail | null;
  actor: { name: string; email: string } | null;
};

/**
 * The team's events, newest first, a page at a time: `before` is the last entry of the previous page
 * ({ at, id }), so pages stay stable while new events arrive.
 */
export async function listAudit(
  teamId: string,
  { limit = 50, before, action }: { limit?: number; before?: { at: Date; id: string }; action?: string } = {},
): Promise<AuditEntry[]> {
  const where: SQL[] = [eq(auditLog.teamId, teamId)];
  if (action) where.push(eq(auditLog.action, action));
  if (before) where.push(or(lt(auditLog.createdAt, before.at), and(eq(auditLog.createdAt, before.at), lt(auditLog.id, before.id)))!);
  const rows = await db
    .select({
      id: auditLog.id,
      at: auditLog.createdAt,
      action: auditLog.action,
      subjectType: auditLog.subjectType,
      subjectId: auditLog.subjectId,
      detail: auditLog.detail,
      actorName: user.name,
      actorEmail: user.email,
    })
    .from(auditLog)
    .leftJoin(user, eq(auditLog.actorUserId, user.id))
    .where(and(...where))
    .orderBy(desc(auditLog.createdAt), desc(auditLog.id))
    .limit(Math.min(Math.max(limit, 1), 200));
  return rows.map(({ actorName, actorEmail, ...r }) => ({ ...r, actor: actorName !== null && actorEmail !== null ? { name: actorName, email: actorEmail } : null }));
}

import { data } from "react-router";
import { APIError } from "better-auth/api";
import { and, asc, eq, gt } from "drizzle-orm";
import { invitation, member, organization, user } from "../db/schema/auth";
import { isRole, type Role } from "../lib/access";
import { auth } from "./auth.server";
import { db } from "./db.server";
import { recordAudit } from "./audit.server";
import type { MemberContext } from "./permissions.server";

// Team operations. Callers check the role with requireMember first; better-auth's organization
// endpoints then apply their own rules (e.g. a team always keeps an owner) with the user's cookies.

/** better-auth's message for an expected refusal, as a 400 the form can show; anything else rethrown. */
export function asFormError(error: unknown): never {
  if (error instanceof APIError) {
    const body = error.body as { message?: string } | undefined;
    throw data(body?.message || "The request was refused.", { status: error.statusCode >= 500 ? 500 : 400 });
  }
  throw error;
}

/** The message of an expected 400 refusal thrown by the functions here, or null for anything else. */
export function refusalMessage(error: unknown): string | null {
  const e = error as { type?: string; data?: unknown; init?: { status?: number } } | null;
  if (e && e.type === "DataWithResponseInit" && e.init?.status === 400 && typeof e.data === "string") return e.data;
  return null;
}

export async function slugTaken(slug: string): Promise<boolean> {
  const [row] = await db.select({ id: organization.id }).from(organization).where(eq(organization.slug, slug)).limit(1);
  return Boolean(row);
}

export async function createTeam(request: Request, name: string, slug: string): Promise<{ slug: string }> {
  try {
    const created = await auth.api.createOrganization({ body: { name, slug }, headers: request.headers });
    return { slug: created?.slug ?? slug };
  } catch (error) {
    asFormError(error);
  }
}

export type TeamMemberRow = { memberId: string; userId: string; name: string; email: string; role: Role; joinedAt: Date };
export type PendingInvitation = { id: string; email: string; role: Role; expiresAt: Date };

export async function listMembers(teamId: string): Promise<TeamMemberRow[]> {
  const rows = await db
    .select({ memberId: member.id, userId: user.id, name: user.name, email: user.email, role: member.role, joinedAt: member.createdAt })
    .from(member)
    .innerJoin(user, eq(member.userId, user.id))
    .where(eq(member.organizationId, teamId))
    .orderBy(asc(user.name));
  return rows.map((r) => ({ ...r, role: isRole(r.role) ? r.role : "driver" }));
}

export async function listPendingInvitations(teamId: string): Promise<PendingInvitation[]> {
  const rows = await db
    .select({ id: invitation.id, email: invitation.email, role: invitation.role, expiresAt: invitation.expiresAt })
    .from(invitation)
    .where(and(eq(invitation.organizationId, teamId), eq(invitation.status, "pending"), gt(invitation.expiresAt, new Date())))
    .orderBy(asc(invitation.email));
  return rows.map((r) => ({ ...r, role: isRole(r.role) ? r.role : "driver" }));
}

async function memberOfTeam(teamId: string, memberId: string) {
  const [row] = await db
    .select({ id: member.id, userId: member.userId })
    .from(member)
    .where(and(eq(member.id, memberId), eq(member.organizationId, teamId)))
    .limit(1);
  if (!row) throw data("No such member in this team.", { status: 404 });
  return row;
}

export async function renameTeam(request: Request, ctx: MemberContext, name: string): Promise<void> {
  try {
    await auth.api.updateOrganization({ body: { organizationId: ctx.team.id, data: { name } }, headers: request.headers });
  } catch (error) {
    asFormError(error);
  }
  await recordAudit(db, { teamId: ctx.team.id, actorUserId: ctx.user.id, action: "team_renamed", subjectType: "team", subjectId: ctx.team.id, detail: { from: ctx.team.name, to: name } });
}

export async function inviteToTeam(request: Request, ctx: MemberContext, email: string, role: Role): Promise<void> {
  const [already] = await db
    .select({ id: member.id })
    .from(member)
    .innerJoin(user, eq(member.userId, user.id))
    .where(and(eq(member.organizationId, ctx.team.id), eq(user.email, email)))
    .limit(1);
  if (already) throw data(`${email} is already a member of ${ctx.team.name}.`, { status: 400 });
  try {
    await auth.api.createInvitation({ body: { email, role, organizationId: ctx.team.id, resend: true }, headers: request.headers });
  } catch (error) {
    asFormError(error);
  }
  await recordAudit(db, { teamId: ctx.team.id, actorUserId: ctx.user.id, action: "member_invited", subjectType: "invitation", subjectId: email, detail: { email, role } });
}

export async function changeMemberRole(request: Request, ctx: MemberContext, memberId: string, role: Role): Promise<void> {
  const target = await memberOfTeam(ctx.team.id, memberId);
  if (target.userId === ctx.user.id && role !== "owner") {
    const owners = (await listMembers(ctx.team.id)).filter((m) => m.role === "owner");
    if (owners.length <= 1) throw data("You are the only owner: make someone else owner before changing your own role.", { status: 400 });
  }
  try {
    await auth.api.updateMemberRole({ body: { memberId, role, organizationId: ctx.team.id }, headers: request.headers });
  } catch (error) {
    asFormError(error);
  }
  await recordAudit(db, { teamId: ctx.team.id, actorUserId: ctx.user.id, action: "member_role_changed", subjectType: "member", subjectId: target.userId, detail: { role } });
}

export async function removeFromTeam(request: Request, ctx: MemberContext, memberId: string): Promise<void> {
  const target = await memberOfTeam(ctx.team.id, memberId);
  if (target.userId === ctx.user.id) throw data("You cannot remove yourself; ask another owner.", { status: 400 });
  try {
    await auth.api.removeMember({ body: { memberIdOrEmail: memberId, organizationId: ctx.team.id }, headers: request.headers });
  } catch (error) {
    asFormError(error);
  }
  await recordAudit(db, { teamId: ctx.team.id, actorUserId: ctx.user.id, action: "member_removed", subjectType: "member", subjectId: target.userId });
}

export async function revokeInvitation(request: Request, ctx: MemberContext, invitationId: string): Promise<void> {
  const [row] = await db
    .select({ id: invitation.id })
    .from(invitation)
    .where(and(eq(invitation.id, invitationId), eq(invitation.organizationId, ctx.team.id)))
    .limit(1);
  if (!row) throw data("No such invitation in this team.", { status: 404 });
  try {
    await auth.api.cancelInvitation({ body: { invitationId }, headers: request.headers });
  } catch (error) {
    asFormError(error);
  }
  await recordAudit(db, { teamId: ctx.team.id, actorUserId: ctx.user.id, action: "invitation_revoked", subjectType: "invitation", subjectId: invitationId });
}

export type InvitationView = {
  id: string;
  email: string;
  role: Role;
  status: string;
  expired: boolean;
  teamName: string;
  teamSlug: string;
  inviterName: string;
};

export async function findInvitation(id: string): Promise<InvitationView | null> {
  const [row] = await db
    .select({
      id: invitation.id,
      email: invitation.email,
      role: invitation.role,
      status: invitation.status,
      expiresAt: invitation.expiresAt,
      teamName: organization.name,
      teamSlug: organization.slug,
      inviterName: user.name,
    })
    .from(invitation)
    .innerJoin(organization, eq(invitation.organizationId, organization.id))
    .innerJoin(user, eq(invitation.inviterId, user.id))
    .where(eq(invitation.id, id))
    .limit(1);
  if (!row) return null;
  const { expiresAt, ...rest } = row;
  return { ...rest, role: isRole(row.role) ? row.role : "driver", expired: expiresAt < new Date() };
}

export async function pendingInvitationsFor(email: string): Promise<Array<{ id: string; teamName: string; role: Role }>> {
  const rows = await db
    .select({ id: invitation.id, teamName: organization.name, role: invitation.role })
    .from(invitation)
    .innerJoin(organization, eq(invitation.organizationId, organization.id))
    .where(and(eq(invitation.email, email.toLowerCase()), eq(invitation.status, "pending"), gt(invitation.expiresAt, new Date())));
  return rows.map((r) => ({ ...r, role: isRole(r.role) ? r.role : "driver" }));
}

export async function answerInvitation(request: Request, id: string, accept: boolean): Promise<void> {
  try {
    if (accept) await auth.api.acceptInvitation({ body: { invitationId: id }, headers: request.headers });
    else await auth.api.rejectInvitation({ body: { invitationId: id }, headers: request.headers });
  } catch (error) {
    asFormError(error);
  }
}

/** Where a signed-in user starts: their first team's dashboard, or team creation. */
export async function startPathFor(userId: string): Promise<string> {
  const [first] = await db
    .select({ slug: organization.slug })
    .from(member)
    .innerJoin(organization, eq(member.organizationId, organization.id))
    .where(eq(member.userId, userId))
    .orderBy(asc(member.createdAt))
    .limit(1);
  return first ? `/t/${first.slug}` : "/teams/new";
}

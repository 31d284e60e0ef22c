import { data } from "react-router";
import { eq, sql } from "drizzle-orm";
import { member, organization } from "../db/schema/auth";
import { can, isRole, type Permission, type Role } from "../lib/access";
import { db } from "./db.server";
import { requireSameOrigin } from "./same-origin.server";
import { failure, getSignedIn, type SignedIn } from "./session.server";

// Statements, roles and can() are declared once in app/lib/access.ts (client-safe, so the UI can
// hide what a role cannot do); this module is the server's single enforcement point.
export { ac, can, isRole, roles, ROLES, ROLE_LABELS, statements } from "../lib/access";
export type { Permission, Role } from "../lib/access";

export type Team = { id: string; name: string; slug: string };
export type MemberContext = SignedIn & { team: Team; role: Role; memberId: string };

/**
 * The signed-in user, or a thrown 401: pages are redirected to /sign-in?next=..., resource routes
 * (/api/...) get JSON with status 401. A state-changing request from another site is refused first (403):
 * see same-origin.server.ts.
 */
export async function requireUser(request: Request): Promise<SignedIn> {
  requireSameOrigin(request);
  const signedIn = await getSignedIn(request);
  if (!signedIn) throw failure(request, 401, "Sign in to continue.");
  return signedIn;
}

/**
 * The signed-in user as a member of the team named in the URL. Throws 401 (not signed in), 404
 * (no such team, or not a member: another team's existence is not revealed), 403 (the member's role
 * lacks `permission`).
 */
export async function requireMember(
  request: Request,
  teamSlug: string | undefined,
  permission?: Permission,
): Promise<MemberContext> {
  const signedIn = await requireUser(request);
  const notFound = () => failure(request, 404, "No such team, or you are not a member of it.");
  if (!teamSlug) throw notFound();
  const row = await membershipOf(request, teamSlug, signedIn.user.id);
  if (!row) throw notFound();
  const role = primaryRole(row.role);
  if (permission && !can(role, permission)) {
    throw failure(request, 403, "Your role in this team does not allow this.");
  }
  return { ...signedIn, team: { id: row.id, name: row.name, slug: row.slug }, role, memberId: row.memberId };
}

type Membership = { id: string; name: string; slug: string; role: string; memberId: string };

// Every signed-in request reads the user's memberships: one prepared statement, so the query is not built
// again per request (Drizzle's builder costs more CPU than the round trip; npm run bench:render).
let membershipsStatement: ReturnType<typeof prepareMemberships> | undefined;
function prepareMemberships() {
  return db
    .select({ id: organization.id, name: organization.name, slug: organization.slug, role: member.role, memberId: member.id })
    .from(member)
    .innerJoin(organization, eq(member.organizationId, organization.id))
    .where(eq(member.userId, sql.placeholder("userId")))
    .orderBy(organization.name)
    .prepare();
}

/** The user's teams (with the member row's role, as stored), ordered by team name. */
export function membershipsOfUser(userId: string): Promise<Membership[]> {
  return (membershipsStatement ??= prepareMemberships()).execute({ userId });
}

// Every team of the user, looked up once per request: the layout's loader (the team switcher) and the
// page's loader (requireMember) both read it. Slugs compare as MariaDB's default collation does (case-insensitive).
const membershipsOf = new WeakMap<Request, { userId: string; rows: Promise<Membership[]> }>();

function membershipsOfRequest(request: Request, userId: string): Promise<Membership[]> {
  const known = membershipsOf.get(request);
  if (known && known.userId === userId) return known.rows;
  const rows = membershipsOfUser(userId);
  membershipsOf.set(request, { userId, rows });
  return rows;
}

async function membershipOf(request: Request, teamSlug: string, userId: string): Promise<Membership | undefined> {
  const wanted = teamSlug.toLowerCase();
  return (await membershipsOfRequest(request, userId)).find((m) => m.slug.toLowerCase() === wanted);
}

/** better-auth stores roles as a comma list; Rakeline gives each member one. Unknown → driver (least). */
function primaryRole(stored: string): Role {
  const first = stored.split(",").map((r) => r.trim()).find(isRole);
  return first ?? "driver";
}

/**
 * The teams a user belongs to, for the team switcher and the start page. With the request, the lookup
 * requireMember made for it is reused.
 */
export async function listTeamsOf(userId: string, request?: Request): Promise<Array<Team & { role: Role }>> {
  const rows = request ? await membershipsOfRequest(request, userId) : await membershipsOfUser(userId);
  return rows.map((r) => ({ id: r.id, name: r.name, slug: r.slug, role: primaryRole(r.role) }));
}

/** For route actions: a thrown 400 with a message when an expected step fails. */
export function badRequest(message: string): never {
  throw data(message, { status: 400 });
}

/**
 * Who is calling a team-scoped API route that works both from a script and from our own pages:
 *   - `Authorization: Bearer <token>`: the token's user in the token's team;
 *   - a signed-in cookie: the team named by `teamSlug` (a route parameter), else by the `team` query
 *     parameter (its slug), else the user's only team.
 * Throws a JSON Response: 401 without a usable token or session, 400 when a user of several teams names
 * none, 404 for a team the caller is not in, 403 when the role lacks `permission`.
 */
import { can, isRole, type Permission, type Role } from "../lib/access";
import { authenticateToken } from "./api-tokens.server";
import { membershipsOfUser } from "./permissions.server";
import { requireSameOrigin } from "./same-origin.server";
import { getSignedIn } from "./session.server";

export type ApiAccess = { userId: string; teamId: string; teamSlug: string; role: Role; via: "token" | "cookie" };

const json = (status: number, error: string, headers?: HeadersInit) => Response.json({ error }, { status, headers });

/** better-auth stores roles as a comma list; Rakeline gives each member one. Unknown → driver (the least). */
function roleOf(stored: string): Role {
  return stored.split(",").map((r) => r.trim()).find(isRole) ?? "driver";
}

function bearerOf(request: Request): string | null | undefined {
  const header = request.headers.get("authorization");
  if (header === null) return undefined;
  const m = /^Bearer\s+(\S+)\s*$/i.exec(header);
  return m ? m[1] : null;
}

export async function requireApiAccess(
  request: Request,
  _context?: unknown,
  options: { teamSlug?: string; permission?: Permission } = {},
): Promise<ApiAccess> {
  const access = await resolve(request, options.teamSlug);
  if (options.permission && !can(access.role, options.permission)) throw json(403, "Your role in this team does not allow this.");
  return access;
}

async function resolve(request: Request, teamSlug: string | undefined): Promise<ApiAccess> {
  const bearer = bearerOf(request);
  if (bearer !== undefined) {
    const holder = bearer === null ? null : await authenticateToken(bearer);
    if (!holder) throw json(401, "The API token is missing, malformed, revoked or unknown. Make one on your account page.", { "WWW-Authenticate": 'Bearer realm="rakeline"' });
    const wanted = teamSlug ?? new URL(request.url).searchParams.get("team") ?? undefined;
    if (wanted && wanted.toLowerCase() !== holder.teamSlug.toLowerCase()) throw json(404, "No such team for this token: a token works for the one team it was made for.");
    return { userId: holder.userId, teamId: holder.teamId, teamSlug: holder.teamSlug, role: roleOf(holder.role), via: "token" };
  }
  requireSameOrigin(request);
  const signedIn = await getSignedIn(request);
  if (!signedIn) throw json(401, "Sign in, or send an API token as Authorization: Bearer <token>.", { "WWW-Authenticate": 'Bearer realm="rakeline"' });
  const teams = await membershipsOfUser(signedIn.user.id);
  const wanted = teamSlug ?? new URL(request.url).searchParams.get("team") ?? undefined;
  let team: (typeof teams)[number] | undefined;
  if (wanted) {
    team = teams.find((t) => t.slug.toLowerCase() === wanted.toLowerCase());
    if (!team) throw json(404, "No such team, or you are not a member of it.");
  } else if (teams.length === 1) {
    team = teams[0];
  } else if (teams.length === 0) {
    throw json(404, "You are not a member of any team yet.");
  } else {
    throw json(400, `You are in ${teams.length} teams: name one with ?team=<slug> (${teams.map((t) => t.slug).join(", ")}).`);
  }
  return { userId: signedIn.user.id, teamId: team.id, teamSlug: team.slug, role: roleOf(team.role), via: "cookie" };
}

// GET /api/t/:teamSlug/logger-profiles?signature=<sha256 of the header's columns> — the team's Logger
// profiles, those whose header matches first: {"profiles": [{id, name, map, matches}]}.
import { and, desc, eq } from "drizzle-orm";
import { loggerProfiles } from "~/db/schema/sessions";
import { HEADER_SIGNATURE } from "~/lib/sessions/logger-profile";
import { db } from "~/server/db.server";
import { requireMember } from "~/server/permissions.server";
import type { Route } from "./+types/logger-profiles";

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { session: ["upload"] });
  const signature = new URL(request.url).searchParams.get("signature")?.toLowerCase() ?? null;
  if (signature !== null && !HEADER_SIGNATURE.test(signature)) {
    return Response.json({ error: "signature must be the SHA-256 of the header's columns: 64 hex digits." }, { status: 400 });
  }
  const rows = await db
    .select({ id: loggerProfiles.id, name: loggerProfiles.name, map: loggerProfiles.map, headerSignature: loggerProfiles.headerSignature })
    .from(loggerProfiles)
    .where(and(eq(loggerProfiles.teamId, ctx.team.id)))
    .orderBy(desc(loggerProfiles.lastUsedAt), loggerProfiles.name)
    .limit(200);
  const profiles = rows
    .map((r) => ({ id: r.id, name: r.name, map: r.map, matches: signature !== null && r.headerSignature === signature }))
    .sort((a, b) => Number(b.matches) - Number(a.matches));
  return Response.json({ profiles }, { headers: { "Cache-Control": "private, no-cache" } });
}

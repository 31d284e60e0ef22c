// GET /t/:teamSlug/export.zip — all of the team's data as one zip (team.json and the raw files), for the
// owner. Recorded in the audit log before the archive streams.
import { requireMember } from "~/server/permissions.server";
import { recordAudit } from "~/server/audit.server";
import { db } from "~/server/db.server";
import { teamArchive } from "~/server/export-team.server";
import type { Route } from "./+types/export";

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { team: ["update"] });
  await recordAudit(db, { teamId: ctx.team.id, actorUserId: ctx.user.id, action: "team_exported", subjectType: "team", subjectId: ctx.team.id });
  const { body, fileName } = await teamArchive(ctx.team.id);
  return new Response(body, {
    headers: {
      "Content-Type": "application/zip",
      "Content-Disposition": `attachment; filename="${fileName}"`,
      "Cache-Control": "no-store",
    },
  });
}

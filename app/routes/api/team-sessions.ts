// POST /api/t/:teamSlug/sessions — store a session from an upload, the confirmed details and Channel map,
// and the browser's summary (JSON; see app/server/ingest/session-post.server.ts for the answers).
import { readJson } from "~/server/body.server";
import { requireMember } from "~/server/permissions.server";
import { databaseDownResponse, isDatabaseDown } from "~/server/ingest/db-errors.server";
import { postSession } from "~/server/ingest/session-post.server";
import type { Route } from "./+types/team-sessions";

export function loader() {
  return Response.json({ error: "POST a session (uploadId, details, map, browser) to store it; GET /api/sessions lists them." }, { status: 405, headers: { Allow: "POST" } });
}

export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return loader();
  try {
    const ctx = await requireMember(request, params.teamSlug, { session: ["upload"] });
    // The browser's summary with its decimated traces is a few hundred kB; the server caps JSON bodies at 1 MiB.
    const body = await readJson(request, { maxBytes: 1024 * 1024, maxDepth: 16 });
    const answer = await postSession(ctx.team, ctx.user.id, body);
    return Response.json(answer.body, { status: answer.status });
  } catch (error) {
    if (isDatabaseDown(error)) return databaseDownResponse();
    throw error;
  }
}

// GET /api/sessions/:sessionId — a session's details and its summary of record (JSON; ETag, 304).
import { requireApiAccess } from "~/server/api-access.server";
import { getSessionReport, sessionJson, sessionVersion } from "~/server/report/session.server";
import { cachedJson, etagOf, sessionUrl } from "~/server/report/api.server";
import type { Route } from "./+types/session-summary";

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const access = await requireApiAccess(request, context, { permission: { session: ["read"] } });
  const version = await sessionVersion(access.teamId, params.sessionId);
  return cachedJson(request, etagOf("session", params.sessionId, version), async () => {
    const { head, summary } = await getSessionReport(access.teamId, params.sessionId, { api: true });
    return { session: sessionJson(head, sessionUrl(request, access.teamSlug, head.id)), summary };
  });
}

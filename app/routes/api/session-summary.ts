// GET /api/sessions/:sessionId — a session's details and its summary of record (JSON; ETag, 304).
// A request with If-None-Match is answered from the session's version alone (a 304 reads no summary); any
// other reads the row once and passes the stored summary text through without parsing it.
import { requireApiAccess } from "~/server/api-access.server";
import { getSessionForApi, sessionJson, sessionVersion } from "~/server/report/session.server";
import { etagOf, jsonTextResponse, notModified, notModifiedResponse, sessionUrl } from "~/server/report/api.server";
import type { Route } from "./+types/session-summary";

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const access = await requireApiAccess(request, context, { permission: { session: ["read"] } });
  if (request.headers.has("if-none-match")) {
    const etag = etagOf("session", params.sessionId, await sessionVersion(access.teamId, params.sessionId));
    if (notModified(request, etag)) return notModifiedResponse(etag);
  }
  const { head, version, summaryText } = await getSessionForApi(access.teamId, params.sessionId);
  const session = JSON.stringify(sessionJson(head, sessionUrl(request, access.teamSlug, head.id)));
  return jsonTextResponse(etagOf("session", params.sessionId, version), `{"session":${session},"summary":${summaryText ?? "null"}}`);
}

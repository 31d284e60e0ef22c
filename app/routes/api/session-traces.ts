// GET /api/sessions/:sessionId/traces — the decimated traces of the stint, columnar:
// { t_s: [...], bucket_rows, channels: { name: { min: [...], max: [...] } } } (null for a gap).
import { requireApiAccess } from "~/server/api-access.server";
import { getSessionTraces, sessionVersion } from "~/server/report/session.server";
import { apiError, cachedJson, etagOf, notModified, notModifiedResponse } from "~/server/report/api.server";
import type { Route } from "./+types/session-traces";

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const access = await requireApiAccess(request, context, { permission: { session: ["read"] } });
  const version = await sessionVersion(access.teamId, params.sessionId);
  const etag = etagOf("traces", params.sessionId, version);
  if (notModified(request, etag)) return notModifiedResponse(etag);
  const { traces } = await getSessionTraces(access.teamId, params.sessionId, { api: true });
  if (!traces) return apiError(409, "This session has no traces yet: the log has not been read.");
  return cachedJson(request, etag, () => ({ id: params.sessionId, ...(traces as object) }));
}

// GET /api/sessions/:sessionId/bands.csv — the speed-band table for a spreadsheet (RFC 4180, formula cells neutralised).
import { requireApiAccess } from "~/server/api-access.server";
import { getSessionReport, sessionVersion } from "~/server/report/session.server";
import { apiError, cachedCsv, etagOf, notModified, notModifiedResponse } from "~/server/report/api.server";
import { BAND_CSV_FIELDS, bandRowsForCsv, csvFileName, toCsv } from "~/lib/report/csv";
import type { Route } from "./+types/session-bands-csv";

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const access = await requireApiAccess(request, context, { permission: { session: ["read"] } });
  const version = await sessionVersion(access.teamId, params.sessionId);
  const etag = etagOf("bands.csv", params.sessionId, version);
  if (notModified(request, etag)) return notModifiedResponse(etag);
  const { head, summary } = await getSessionReport(access.teamId, params.sessionId, { api: true });
  if (!summary) return apiError(409, "This session has no figures yet: the log has not been read.");
  return cachedCsv(request, etag, csvFileName(`${head.name} ${head.sessionDate ?? ""} bands`), () =>
    toCsv(["session", "date", ...BAND_CSV_FIELDS], bandRowsForCsv(summary.bands).map((row) => [head.name, head.sessionDate, ...row])),
  );
}

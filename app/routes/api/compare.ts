// GET /api/compare?ids=a,b,… — sessions side by side, each against the first: changes with 95 %
// intervals flagged clear or not (compareSessions), setup fields that changed, loads in standard air.
import { requireApiAccess } from "~/server/api-access.server";
import { compareReport, CompareInputError } from "~/server/report/compare.server";
import { apiError, sessionUrl } from "~/server/report/api.server";
import type { Route } from "./+types/compare";

export async function loader({ request, context }: Route.LoaderArgs) {
  const access = await requireApiAccess(request, context, { permission: { compare: ["read"] } });
  const ids = (new URL(request.url).searchParams.get("ids") ?? "").split(",").map((s) => s.trim()).filter(Boolean);
  try {
    const body = await compareReport(access.teamId, ids, (id) => sessionUrl(request, access.teamSlug, id));
    return Response.json(body, { headers: { "Cache-Control": "private, no-cache", Vary: "Authorization, Cookie" } });
  } catch (e) {
    if (e instanceof CompareInputError) return apiError(e.status, e.message);
    throw e;
  }
}

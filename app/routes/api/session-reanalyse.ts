// POST /api/t/:teamSlug/sessions/:sessionId/reanalyse — runs the engine again on the stored raw file
// (after a setup-version correction: setupId, or a new engine). Cookie session (engineer, owner) or an API
// token of the team. JSON or form body {setupId?}. 202 {jobId, url}; 404 another team's or unknown session;
// 422 a setup version of another car.
import { requireApiAccess } from "~/server/api-access.server";
import { readFormFields, readJson } from "~/server/body.server";
import { reanalyseSchema, requestReanalysis } from "~/server/sessions/reanalyse.server";
import type { Route } from "./+types/session-reanalyse";

export function loader() {
  return Response.json({ error: "POST to re-analyse the session's stored file." }, { status: 405, headers: { Allow: "POST" } });
}

export async function action({ request, params, context }: Route.ActionArgs) {
  if (request.method !== "POST") return loader();
  const access = await requireApiAccess(request, context, { teamSlug: params.teamSlug, permission: { session: ["upload"] } });
  const isJson = (request.headers.get("content-type") ?? "").toLowerCase().startsWith("application/json");
  const body = isJson ? await readJson(request, { maxBytes: 4096, maxDepth: 4 }) : request.headers.get("content-length") === "0" || !request.body ? {} : await readFormFields(request);
  const parsed = reanalyseSchema.safeParse(body ?? {});
  if (!parsed.success) return Response.json({ error: "setupId must be a setup version's id." }, { status: 422 });
  const outcome = await requestReanalysis(access.teamId, access.userId, params.sessionId, parsed.data);
  if (!outcome.ok) return Response.json({ error: outcome.error }, { status: outcome.status });
  return Response.json({ jobId: outcome.jobId, url: `/t/${access.teamSlug}/sessions/${params.sessionId}` }, { status: 202 });
}

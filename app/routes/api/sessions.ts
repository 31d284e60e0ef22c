// GET /api/sessions — the team's sessions, newest first, with filters (car, setup, from, to, venue, driver,
// state) and cursor pagination (limit, cursor): {"sessions": [...], "next": cursor | null}. Token or cookie.
// POST /api/sessions — headless ingest with an API token: multipart `file` + `meta` (app/server/ingest/api-upload.server.ts).
import { requireApiAccess } from "~/server/api-access.server";
import { env } from "~/server/env.server";
import { apiUpload } from "~/server/ingest/api-upload.server";
import { DATABASE_DOWN_MESSAGE_API, databaseDownResponse, isDatabaseDown } from "~/server/ingest/db-errors.server";
import { refuseDeclaredOversize, UploadRefusal } from "~/server/ingest/upload.server";
import { listSessionsApi, sessionApiSchema, type SessionRow } from "~/server/sessions/list.server";
import type { Route } from "./+types/sessions";

function apiRow(teamSlug: string, r: SessionRow) {
  return {
    id: r.id,
    url: new URL(`/t/${teamSlug}/sessions/${r.id}`, env.APP_URL).toString(),
    date: r.date,
    venue: r.venue,
    car: r.car,
    setup: r.setup,
    driver: r.driver,
    run: r.run,
    state: r.state,
    duration_s: r.durationS,
    cla_total_m2: r.claTotalM2,
    balance_front_pct: r.balanceFrontPct,
  };
}

export async function loader({ request, context }: Route.LoaderArgs) {
  try {
    const access = await requireApiAccess(request, context, { permission: { session: ["read"] } });
    const params = Object.fromEntries(new URL(request.url).searchParams);
    delete params.team;
    const parsed = sessionApiSchema.safeParse(params);
    if (!parsed.success) {
      const issue = parsed.error.issues[0];
      return Response.json({ error: `${issue.path.join(".") || "query"}: ${issue.message}` }, { status: 400 });
    }
    let page;
    try {
      page = await listSessionsApi(access.teamId, parsed.data);
    } catch (error) {
      if ((error as Error).message === "bad_cursor") return Response.json({ error: "cursor: not a cursor this API gave out; start again without it." }, { status: 400 });
      throw error;
    }
    return Response.json(
      { sessions: page.rows.map((r) => apiRow(access.teamSlug, r)), next: page.next },
      { headers: { "Cache-Control": "private, no-cache", Vary: "Authorization, Cookie" } },
    );
  } catch (error) {
    if (isDatabaseDown(error)) return databaseDownResponse("The database is not answering. Try again in a minute.");
    throw error;
  }
}

export async function action({ request, context }: Route.ActionArgs) {
  if (request.method !== "POST") return Response.json({ error: "POST a log (multipart: file, meta) to /api/sessions." }, { status: 405, headers: { Allow: "GET, POST" } });
  try {
    if (!request.headers.has("authorization")) {
      return Response.json({ error: "Send an API token as Authorization: Bearer <token> (make one on your account page)." }, { status: 401, headers: { "WWW-Authenticate": 'Bearer realm="rakeline"' } });
    }
    const access = await requireApiAccess(request, context, { permission: { session: ["upload"] } });
    refuseDeclaredOversize(request);
    const answer = await apiUpload(request, access);
    return Response.json(answer.body, { status: answer.status });
  } catch (error) {
    if (error instanceof UploadRefusal) return Response.json({ error: error.message }, { status: error.status });
    if (isDatabaseDown(error)) return databaseDownResponse(DATABASE_DOWN_MESSAGE_API);
    throw error;
  }
}

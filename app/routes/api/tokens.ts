// GET /api/tokens — the signed-in user's working API tokens, without secrets.
// POST /api/tokens — JSON {"name", "team"} (the team's slug) → 201 {"id", "token"}; the token is shown only here.
// Both need a signed-in cookie session; a token cannot make more tokens.
import { readJson } from "~/server/body.server";
import { createApiToken, createTokenSchema, listApiTokens } from "~/server/api-tokens.server";
import { requireUser } from "~/server/permissions.server";
import type { Route } from "./+types/tokens";

function refuseBearer(request: Request): Response | null {
  if (!request.headers.has("authorization")) return null;
  return Response.json({ error: "API tokens are made and listed from a signed-in session (the account page), not with a token." }, { status: 401 });
}

export async function loader({ request }: Route.LoaderArgs) {
  const refused = refuseBearer(request);
  if (refused) return refused;
  const { user } = await requireUser(request);
  return Response.json({ tokens: await listApiTokens(user.id) }, { headers: { "Cache-Control": "no-store" } });
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return Response.json({ error: "POST {\"name\", \"team\"} to make a token." }, { status: 405, headers: { Allow: "GET, POST" } });
  const refused = refuseBearer(request);
  if (refused) return refused;
  const { user } = await requireUser(request);
  const body = await readJson(request, { maxBytes: 4096, maxDepth: 4 });
  const parsed = createTokenSchema.safeParse(body);
  if (!parsed.success) {
    const fields: Record<string, string> = {};
    for (const issue of parsed.error.issues) fields[String(issue.path[0] ?? "form")] ??= issue.message;
    return Response.json({ error: Object.values(fields)[0], fields }, { status: 400 });
  }
  const made = await createApiToken(user.id, parsed.data.team, parsed.data.name);
  if (!made.ok) return Response.json({ error: made.message }, { status: made.status });
  return Response.json({ id: made.id, token: made.token }, { status: 201, headers: { "Cache-Control": "no-store" } });
}

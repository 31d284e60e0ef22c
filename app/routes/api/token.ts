// DELETE /api/tokens/:id — revokes one of the signed-in user's tokens: 204, or 404 when it is not theirs.
import { revokeApiToken } from "~/server/api-tokens.server";
import { requireUser } from "~/server/permissions.server";
import type { Route } from "./+types/token";

export function loader() {
  return Response.json({ error: "DELETE /api/tokens/:id revokes a token; GET /api/tokens lists them." }, { status: 405, headers: { Allow: "DELETE" } });
}

export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "DELETE") return Response.json({ error: "DELETE revokes a token." }, { status: 405, headers: { Allow: "DELETE" } });
  if (request.headers.has("authorization")) {
    return Response.json({ error: "Revoke tokens from a signed-in session (the account page), not with a token." }, { status: 401 });
  }
  const { user } = await requireUser(request);
  const revoked = await revokeApiToken(user.id, params.id);
  if (!revoked) return Response.json({ error: "No such token of yours (it may be revoked already)." }, { status: 404 });
  return new Response(null, { status: 204 });
}

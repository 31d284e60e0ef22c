import { withClientAddress } from "~/server/client-address.server";
import { auth } from "~/server/auth.server";
import type { Route } from "./+types/auth";

// better-auth's own HTTP endpoints (/api/auth/*), limited to the ones a browser or a script needs over HTTP:
// the e-mail confirmation link, the session, and JSON sign-in/out for scripts. Everything else (sign-up,
// password reset and change, profile, teams, members, invitations) goes through Rakeline's forms and
// server functions, which apply the app's own checks first; better-auth's hooks (auth.server.ts) repeat
// the checks for names, slugs and roles wherever they come from.
const OPEN_ENDPOINTS: Record<string, ReadonlyArray<string>> = {
  GET: ["/verify-email", "/get-session", "/ok"],
  POST: ["/sign-in/email", "/sign-out"],
};

function endpointOf(request: Request): string {
  return new URL(request.url).pathname.replace(/^\/api\/auth/, "").replace(/\/+$/, "") || "/";
}

function notOpen(request: Request): Response {
  return Response.json({ error: `No such endpoint: ${request.method} /api/auth${endpointOf(request)}.` }, { status: 404 });
}

export async function loader({ request, context }: Route.LoaderArgs) {
  if (!OPEN_ENDPOINTS.GET.includes(endpointOf(request))) return notOpen(request);
  return auth.handler(withClientAddress(request, context));
}

export async function action({ request, context }: Route.ActionArgs) {
  if (!(OPEN_ENDPOINTS[request.method] ?? []).includes(endpointOf(request))) return notOpen(request);
  return auth.handler(withClientAddress(request, context));
}

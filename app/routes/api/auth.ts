import { auth } from "~/server/auth.server";
import type { Route } from "./+types/auth";

// better-auth's own endpoints (/api/auth/*): e-mail verification links, JSON sign-up/in, sessions.
export async function loader({ request }: Route.LoaderArgs) {
  return auth.handler(request);
}

export async function action({ request }: Route.ActionArgs) {
  return auth.handler(request);
}

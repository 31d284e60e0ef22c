import { redirect } from "react-router";
import { signOut } from "~/server/auth-forms.server";
import type { Route } from "./+types/sign-out";

// POST only: a link or prefetch must never sign anyone out.
export async function loader() {
  return redirect("/");
}

export async function action({ request, context }: Route.ActionArgs) {
  return signOut({ request, context });
}

import { Link, redirect } from "react-router";
import { AuthCard } from "~/components/ui/panels";
import { safeNext } from "~/lib/auth-schemas";
import { getSignedIn } from "~/server/session.server";
import { startPathFor } from "~/server/teams.server";
import type { Route } from "./+types/verify";

// The confirmation link goes through /api/auth/verify-email, which signs the user in and sends them
// here; on a bad or expired token it comes back with ?error=.
export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const error = url.searchParams.get("error");
  const signedIn = await getSignedIn(request);
  if (!error && signedIn?.user.emailVerified) {
    throw redirect(safeNext(url.searchParams.get("next")) ?? (await startPathFor(signedIn.user.id)));
  }
  return { error: error ? "expired" : "not-signed-in" } as const;
}

export default function Verify({ loaderData }: Route.ComponentProps) {
  return (
    <AuthCard title={loaderData.error === "expired" ? "This link no longer works" : "Confirm your e-mail address"}>
      <p className="text-ink-soft">
        {loaderData.error === "expired"
          ? "The confirmation link is invalid, already used or older than 24 hours. Sign in with your e-mail address and password: if the address is still unconfirmed, we send you a new link."
          : "Open the confirmation link from the e-mail we sent you. If you already confirmed, sign in."}
      </p>
      <Link to="/sign-in" className="mt-4 inline-block rounded border border-accent bg-accent px-3 py-2 text-sm font-medium text-white">
        Sign in
      </Link>
    </AuthCard>
  );
}

export const meta: Route.MetaFunction = () => [{ title: "Confirm e-mail · Rakeline" }];

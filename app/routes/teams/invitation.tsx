import { data, Form, Link, redirect, useNavigation } from "react-router";
import { z } from "zod";
import { AuthCard } from "~/components/ui/panels";
import { Button, FormAlert } from "~/components/ui/form";
import { ROLE_LABELS, ROLE_SUMMARIES } from "~/lib/access";
import { requireUser } from "~/server/permissions.server";
import { getSignedIn } from "~/server/session.server";
import { answerInvitation, findInvitation, refusalMessage } from "~/server/teams.server";
import type { Route } from "./+types/invitation";
import { readFormFields } from "~/server/body.server";

const answerSchema = z.object({ intent: z.enum(["accept", "decline"], { error: "Choose accept or decline." }) });

export async function loader({ request, params }: Route.LoaderArgs) {
  const invitation = await findInvitation(params.id);
  if (!invitation) throw data("This invitation does not exist. Ask the team owner to send a new one.", { status: 404 });
  const signedIn = await getSignedIn(request);
  const here = `/invitations/${params.id}`;
  const state = invitation.status !== "pending" || invitation.expired ? "closed" : !signedIn ? "signed-out" : signedIn.user.email !== invitation.email ? "other-user" : "open";
  return {
    here,
    state,
    status: invitation.expired && invitation.status === "pending" ? "expired" : invitation.status,
    teamName: invitation.teamName,
    inviterName: invitation.inviterName,
    role: invitation.role,
    // Only the invited person learns which address was invited.
    email: state === "open" ? invitation.email : null,
    signedInAs: signedIn?.user.email ?? null,
  } as const;
}

export async function action({ request, params }: Route.ActionArgs) {
  await requireUser(request);
  const parsed = answerSchema.safeParse(await readFormFields(request));
  if (!parsed.success) return data({ error: parsed.error.issues[0].message }, { status: 400 });
  const invitation = await findInvitation(params.id);
  if (!invitation) throw data("This invitation does not exist.", { status: 404 });
  try {
    await answerInvitation(request, params.id, parsed.data.intent === "accept");
  } catch (error) {
    const refusal = refusalMessage(error);
    if (refusal) return data({ error: refusal }, { status: 400 });
    throw error;
  }
  return redirect(parsed.data.intent === "accept" ? `/t/${invitation.teamSlug}` : "/");
}

export default function Invitation({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const { state, teamName, inviterName, role, here } = loaderData;
  const next = encodeURIComponent(here);
  return (
    <AuthCard title={`Join ${teamName}`}>
      <p className="text-ink-soft">
        {inviterName} invited you to join <strong className="text-ink">{teamName}</strong> as <strong className="text-ink">{ROLE_LABELS[role]}</strong>.
      </p>
      <p className="mt-1 text-sm text-ink-faint">{ROLE_SUMMARIES[role]}</p>
      <div className="mt-4">
        {state === "closed" && (
          <FormAlert tone="info">This invitation is {loaderData.status === "expired" ? "expired" : `already ${loaderData.status}`}. Ask the team owner for a new one if you still need it.</FormAlert>
        )}
        {state === "signed-out" && (
          <div className="flex flex-wrap gap-3">
            <Link to={`/sign-up?next=${next}`} className="rounded border border-accent bg-accent px-3 py-2 text-sm font-medium text-white">Create an account</Link>
            <Link to={`/sign-in?next=${next}`} className="rounded border border-rule px-3 py-2 text-sm font-medium">Sign in</Link>
            <p className="w-full text-sm text-ink-faint">Use the e-mail address the invitation was sent to; you come back here afterwards.</p>
          </div>
        )}
        {state === "other-user" && (
          <FormAlert tone="info">
            You are signed in as {loaderData.signedInAs}, but this invitation was sent to another address. Sign out and sign in with the invited address.
          </FormAlert>
        )}
        {state === "open" && (
          <Form method="post" className="flex gap-3">
            <FormAlert>{actionData?.error}</FormAlert>
            <Button name="intent" value="accept" busy={busy}>Accept and join</Button>
            <Button name="intent" value="decline" variant="quiet" busy={busy}>Decline</Button>
          </Form>
        )}
      </div>
    </AuthCard>
  );
}

export const meta: Route.MetaFunction = () => [{ title: "Invitation · Rakeline" }];

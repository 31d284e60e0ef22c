import { data, Form, Link, redirect, useNavigation } from "react-router";
import { useState } from "react";
import { AppShell } from "~/components/ui/shell";
import { Button, Field, FormAlert } from "~/components/ui/form";
import { Panel } from "~/components/ui/panels";
import { fieldErrors } from "~/lib/auth-schemas";
import { ROLE_LABELS } from "~/lib/access";
import { createTeamSchema, slugify } from "~/lib/team-schemas";
import { listTeamsOf, requireUser } from "~/server/permissions.server";
import { createTeam, pendingInvitationsFor, slugTaken } from "~/server/teams.server";
import { useFormCheck } from "~/components/ui/use-form-check";
import type { Route } from "./+types/new";
import { readFormFields } from "~/server/body.server";

export async function loader({ request }: Route.LoaderArgs) {
  const { user } = await requireUser(request);
  const [teams, invitations] = await Promise.all([listTeamsOf(user.id), pendingInvitationsFor(user.email)]);
  return { user: { name: user.name, email: user.email }, teams, invitations };
}

export async function action({ request }: Route.ActionArgs) {
  await requireUser(request);
  const form = await readFormFields(request);
  const values = { name: String(form.name ?? ""), slug: String(form.slug ?? "") };
  const parsed = createTeamSchema.safeParse(form);
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error), values }, { status: 400 });
  if (await slugTaken(parsed.data.slug)) {
    return data({ errors: { slug: "This address is taken by another team; choose another." }, values }, { status: 400 });
  }
  const created = await createTeam(request, parsed.data.name, parsed.data.slug);
  return redirect(`/t/${created.slug}`);
}

export default function NewTeam({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const { errors, onSubmit } = useFormCheck(createTeamSchema, actionData?.errors as Record<string, string> | undefined);
  const [name, setName] = useState(actionData?.values.name ?? "");
  const [slug, setSlug] = useState(actionData?.values.slug ?? "");
  const [slugEdited, setSlugEdited] = useState(Boolean(actionData?.values.slug));
  return (
    <AppShell user={loaderData.user} teams={loaderData.teams}>
      <div className="grid max-w-4xl gap-6 md:grid-cols-[3fr_2fr]">
        <Panel title="Create a team">
          <p className="mb-4 text-sm text-ink-soft">
            A team holds your cars, their setups and every session. You become its owner and can invite engineers, analysts and drivers.
          </p>
          <Form method="post" noValidate onSubmit={onSubmit}>
            <FormAlert>{errors.form}</FormAlert>
            <Field
              label="Team name"
              name="name"
              required
              value={name}
              onChange={(e) => {
                setName(e.target.value);
                if (!slugEdited) setSlug(slugify(e.target.value));
              }}
              error={errors.name}
            />
            <Field
              label="Web address"
              name="slug"
              required
              value={slug}
              onChange={(e) => {
                setSlugEdited(true);
                setSlug(e.target.value);
              }}
              error={errors.slug}
              hint={<>Your team's pages live at <span className="num">/t/{slug || "your-team"}</span></>}
            />
            <Button busy={busy}>Create team</Button>
          </Form>
        </Panel>
        {loaderData.invitations.length > 0 && (
          <Panel title="Invitations for you">
            <ul className="space-y-2 text-sm">
              {loaderData.invitations.map((inv) => (
                <li key={inv.id} className="flex items-baseline justify-between gap-3">
                  <span>{inv.teamName} <span className="text-ink-faint">as {ROLE_LABELS[inv.role]}</span></span>
                  <Link className="text-accent underline" to={`/invitations/${inv.id}`}>Open</Link>
                </li>
              ))}
            </ul>
          </Panel>
        )}
      </div>
    </AppShell>
  );
}

export const meta: Route.MetaFunction = () => [{ title: "Create a team · Rakeline" }];

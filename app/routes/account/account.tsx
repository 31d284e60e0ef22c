import { data, Form, useNavigation } from "react-router";
import { AppShell } from "~/components/ui/shell";
import { Button, Field, FormAlert } from "~/components/ui/form";
import { Panel } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import { changePasswordSchema, fieldErrors, PASSWORD_MIN, profileSchema } from "~/lib/auth-schemas";
import { changePassword, updateName } from "~/server/auth-forms.server";
import { listTeamsOf, requireUser } from "~/server/permissions.server";
import { readFormFields } from "~/server/body.server";
import type { Route } from "./+types/account";

export async function loader({ request }: Route.LoaderArgs) {
  const { user } = await requireUser(request);
  const teams = await listTeamsOf(user.id);
  return { user: { name: user.name, email: user.email }, teams };
}

export async function action({ request, context }: Route.ActionArgs) {
  const { user } = await requireUser(request);
  const form = await readFormFields(request);
  if (form.intent === "profile") {
    const parsed = profileSchema.safeParse(form);
    if (!parsed.success) return data({ intent: "profile", errors: fieldErrors(parsed.error), done: null }, { status: 400 });
    await updateName(request, parsed.data.name);
    return { intent: "profile", errors: {}, done: "Name saved." };
  }
  if (form.intent === "password") {
    const parsed = changePasswordSchema.safeParse(form);
    if (!parsed.success) return data({ intent: "password", errors: fieldErrors(parsed.error), done: null }, { status: 400 });
    const result = await changePassword({ request, context }, user.id, parsed.data.currentPassword, parsed.data.password);
    if (!result.ok) return data({ intent: "password", errors: { currentPassword: result.formError }, done: null }, { status: result.status });
    // The session is renewed and other devices are signed out; keep this browser's new cookie.
    const headers = new Headers();
    for (const cookie of result.response.headers.getSetCookie()) headers.append("Set-Cookie", cookie);
    return data({ intent: "password", errors: {}, done: "Password changed. Other devices have been signed out." }, { headers });
  }
  return data({ intent: "", errors: { form: "Unknown request: reload the page and try again." }, done: null }, { status: 400 });
}

export default function Account({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const errorsFor = (intent: string): Record<string, string> => (actionData?.intent === intent ? actionData.errors : {});
  const { user, teams } = loaderData;
  return (
    <AppShell user={user} teams={teams.map((t) => ({ name: t.name, slug: t.slug, role: t.role }))}>
      <div className="max-w-2xl space-y-5">
        <h1 className="text-2xl font-semibold">Account</h1>
        {actionData?.done && <FormAlert tone="info">{actionData.done}</FormAlert>}
        <FormAlert>{(actionData?.errors as Record<string, string> | undefined)?.form}</FormAlert>
        <Panel title="Profile">
          <Form method="post" noValidate>
            <input type="hidden" name="intent" value="profile" />
            <Field label="Name" name="name" defaultValue={user.name} autoComplete="name" error={errorsFor("profile").name} />
            <p className="mb-4 text-sm text-ink-soft">E-mail: <span className="text-ink">{user.email}</span></p>
            <Button busy={busy} variant="quiet">Save name</Button>
          </Form>
        </Panel>
        <Panel title="Change password">
          <Form method="post" noValidate>
            <input type="hidden" name="intent" value="password" />
            <Field label="Current password" name="currentPassword" type="password" autoComplete="current-password" error={errorsFor("password").currentPassword} />
            <Field label="New password" name="password" type="password" autoComplete="new-password" error={errorsFor("password").password} hint={`At least ${PASSWORD_MIN} characters.`} />
            <Field label="Repeat new password" name="confirmPassword" type="password" autoComplete="new-password" error={errorsFor("password").confirmPassword} />
            <Button busy={busy} variant="quiet">Change password</Button>
          </Form>
        </Panel>
        <Panel title="Sign out">
          <Form method="post" action="/sign-out">
            <p className="mb-3 text-sm text-ink-soft">Signs this browser out of Rakeline.</p>
            <Button variant="quiet">Sign out</Button>
          </Form>
        </Panel>
      </div>
    </AppShell>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Account · Rakeline" }];

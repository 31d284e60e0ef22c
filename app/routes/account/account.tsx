import { data, Form, redirect, useNavigation } from "react-router";
import { deleteAccount } from "~/server/team-retention.server";
import { refusalMessage } from "~/server/teams.server";
import { AppShell } from "~/components/ui/shell";
import { Button, Field, FormAlert, SelectField } from "~/components/ui/form";
import { Panel } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import { changePasswordSchema, fieldErrors, PASSWORD_MIN, profileSchema } from "~/lib/auth-schemas";
import { changePassword, updateName } from "~/server/auth-forms.server";
import { listTeamsOf, requireUser } from "~/server/permissions.server";
import { readFormFields } from "~/server/body.server";
import { createApiToken, createTokenSchema, listApiTokens, revokeApiToken } from "~/server/api-tokens.server";
import type { Route } from "./+types/account";

export async function loader({ request }: Route.LoaderArgs) {
  const { user } = await requireUser(request);
  const [teams, tokens] = await Promise.all([listTeamsOf(user.id), listApiTokens(user.id)]);
  return { user: { name: user.name, email: user.email }, teams, tokens };
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
  if (form.intent === "token-create") {
    const parsed = createTokenSchema.safeParse(form);
    if (!parsed.success) return data({ intent: "token-create", errors: fieldErrors(parsed.error), done: null }, { status: 400 });
    const made = await createApiToken(user.id, parsed.data.team, parsed.data.name);
    if (!made.ok) return data({ intent: "token-create", errors: { team: made.message }, done: null }, { status: made.status });
    // Shown once: only the hash is stored.
    return { intent: "token-create", errors: {}, done: `Token "${parsed.data.name}" made.`, token: made.token };
  }
  if (form.intent === "token-revoke") {
    const revoked = await revokeApiToken(user.id, form.tokenId ?? "");
    if (!revoked) return data({ intent: "token-revoke", errors: { form: "No such token of yours (it may be revoked already)." }, done: null }, { status: 404 });
    return { intent: "token-revoke", errors: {}, done: "Token revoked: scripts using it now get 401." };
  }
  if (form.intent === "delete-account") {
    try {
      await deleteAccount(user.id, form.password ?? "");
    } catch (error) {
      const refusal = refusalMessage(error);
      if (refusal) return data({ intent: "delete-account", errors: { password: refusal }, done: null }, { status: 400 });
      throw error;
    }
    // The account's sign-in sessions went with it, so this browser's cookie no longer signs anyone in.
    return redirect("/?account=deleted");
  }
  return data({ intent: "", errors: { form: "Unknown request: reload the page and try again." }, done: null }, { status: 400 });
}

export default function Account({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const errorsFor = (intent: string): Record<string, string> => (actionData?.intent === intent ? actionData.errors : {});
  const { user, teams, tokens } = loaderData;
  const newToken = actionData && "token" in actionData ? (actionData.token as string) : null;
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
        <Panel title="API tokens">
          <p className="mb-3 text-sm text-ink-soft">
            A token lets a pit laptop or a script send logs to one team (<span className="font-mono">POST /api/sessions</span>) and read its
            sessions, acting with your role in that team. It is shown once; keep it like a password.
          </p>
          {newToken && (
            <div className="mb-4 rounded border border-accent/40 bg-rule-soft px-3 py-2 text-sm" role="status">
              <p className="mb-1 font-medium">Copy this token now; it will not be shown again.</p>
              <output data-testid="new-api-token" className="block break-all font-mono text-ink">{newToken}</output>
            </div>
          )}
          {teams.length === 0 ? (
            <p className="mb-4 text-sm text-ink-soft">Join or create a team first: a token belongs to one team.</p>
          ) : (
            <Form key={newToken ?? "token-form"} method="post" noValidate className="mb-4 grid gap-x-3 sm:grid-cols-[1fr_1fr_auto] sm:items-end">
              <input type="hidden" name="intent" value="token-create" />
              <Field label="Token name" name="name" id="token-name" placeholder="Pit laptop" maxLength={80} error={errorsFor("token-create").name} />
              <SelectField label="Team" name="team" options={teams.map((t) => ({ value: t.slug, label: t.name }))} error={errorsFor("token-create").team} />
              <Button busy={busy} variant="quiet" className="mb-4">Make token</Button>
            </Form>
          )}
          {tokens.length === 0 ? (
            <p className="text-sm text-ink-faint">No tokens yet.</p>
          ) : (
            <ul className="divide-y divide-rule border-y border-rule" aria-label="Your API tokens">
              {tokens.map((t) => (
                <li key={t.id} className="flex flex-wrap items-center justify-between gap-2 py-2 text-sm">
                  <div className="min-w-0">
                    <p className="font-medium text-ink">{t.name}</p>
                    <p className="text-ink-faint">
                      {t.team.name} · <span className="font-mono">{t.prefix}…</span> · made {t.createdAt.slice(0, 10)} ·{" "}
                      {t.lastUsedAt ? `last used ${t.lastUsedAt.slice(0, 16).replace("T", " ")} UTC` : "never used"}
                    </p>
                  </div>
                  <Form method="post">
                    <input type="hidden" name="intent" value="token-revoke" />
                    <input type="hidden" name="tokenId" value={t.id} />
                    <Button variant="danger" busy={busy}>Revoke</Button>
                  </Form>
                </li>
              ))}
            </ul>
          )}
        </Panel>
        <Panel title="Delete your account">
          <Form method="post" className="max-w-md" noValidate>
            <input type="hidden" name="intent" value="delete-account" />
            <p className="mb-3 text-sm text-ink-soft">
              Your name, e-mail, password and API tokens are deleted and you are signed out everywhere. What you made in a team
              stays with that team (shown as made by a former member). A team you alone belong to is deleted with its data; if
              you are the only owner of a team with other members, make one of them owner first.
            </p>
            <Field label="Your password, to confirm" name="password" type="password" autoComplete="current-password" required error={errorsFor("delete-account").password} />
            <Button variant="danger">Delete my account</Button>
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

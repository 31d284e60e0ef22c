import { data, Form, Link, redirect, useNavigation } from "react-router";
import { deleteTeam, leaveTeam } from "~/server/team-retention.server";
import { Button, Field, FormAlert, SelectField } from "~/components/ui/form";
import { Panel } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import { fieldErrors } from "~/lib/auth-schemas";
import { can, ROLES, ROLE_LABELS, ROLE_SUMMARIES, type Permission } from "~/lib/access";
import { settingsActionSchema, type SettingsAction } from "~/lib/team-schemas";
import { requireMember, type MemberContext } from "~/server/permissions.server";
import * as teams from "~/server/teams.server";
import type { Route } from "./+types/settings";
import { readFormFields } from "~/server/body.server";

const NEEDS: Record<SettingsAction["intent"], Permission> = {
  rename: { team: ["update"] },
  invite: { member: ["invite"] },
  "change-role": { member: ["update_role"] },
  "remove-member": { member: ["remove"] },
  "revoke-invitation": { member: ["invite"] },
};

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug);
  const canInvite = can(ctx.role, { member: ["invite"] });
  const [members, invitations] = await Promise.all([
    teams.listMembers(ctx.team.id),
    canInvite ? teams.listPendingInvitations(ctx.team.id) : Promise.resolve([]),
  ]);
  return {
    team: ctx.team,
    role: ctx.role,
    me: ctx.user.id,
    members: members.map((m) => ({ ...m, joinedAt: m.joinedAt.toISOString() })),
    invitations: invitations.map((i) => ({ ...i, expiresAt: i.expiresAt.toISOString() })),
    allowed: {
      rename: can(ctx.role, NEEDS.rename),
      invite: canInvite,
      changeRole: can(ctx.role, NEEDS["change-role"]),
      remove: can(ctx.role, NEEDS["remove-member"]),
      exportData: can(ctx.role, { team: ["update"] }),
      audit: can(ctx.role, { team: ["update"] }),
      deleteTeam: can(ctx.role, { team: ["delete"] }),
    },
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const form = await readFormFields(request);
  const intent = String(form.intent ?? "");
  if (intent === "leave" || intent === "delete-team") return retention(request, params.teamSlug, intent, form);
  const needed = NEEDS[intent as SettingsAction["intent"]];
  // The role is checked before the input, so a refused user learns nothing from validation.
  const ctx = await requireMember(request, params.teamSlug, needed ?? { team: ["update"] });
  const parsed = settingsActionSchema.safeParse(form);
  if (!parsed.success) return data({ intent, errors: fieldErrors(parsed.error), done: null }, { status: 400 });
  try {
    return await perform(request, ctx, parsed.data);
  } catch (error) {
    const refusal = teams.refusalMessage(error);
    if (refusal) return data({ intent, errors: { form: refusal }, done: null }, { status: 400 });
    throw error;
  }
}

async function perform(request: Request, ctx: MemberContext, input: SettingsAction) {
  const intent = input.intent;
  switch (input.intent) {
    case "rename":
      await teams.renameTeam(request, ctx, input.name);
      return { intent, errors: {}, done: "Team renamed." };
    case "invite":
      await teams.inviteToTeam(request, ctx, input.email, input.role);
      return { intent, errors: {}, done: `Invitation sent to ${input.email}.` };
    case "change-role":
      await teams.changeMemberRole(request, ctx, input.memberId, input.role);
      return { intent, errors: {}, done: "Role changed." };
    case "remove-member":
      await teams.removeFromTeam(request, ctx, input.memberId);
      return { intent, errors: {}, done: "Member removed." };
    case "revoke-invitation":
      await teams.revokeInvitation(request, ctx, input.invitationId);
      return { intent, errors: {}, done: "Invitation revoked." };
  }
}

/** Leaving (any member) and deleting the team (owner, the address typed to confirm); both end on another page. */
async function retention(request: Request, teamSlug: string, intent: "leave" | "delete-team", form: Record<string, string>) {
  const ctx = await requireMember(request, teamSlug, intent === "delete-team" ? { team: ["delete"] } : undefined);
  try {
    if (intent === "leave") {
      if (form.confirm !== "yes") return data({ intent, errors: { form: "Tick the box to confirm that you leave the team." }, done: null }, { status: 400 });
      await leaveTeam(ctx.team.id, ctx.team.name, ctx.user.id, ctx.role);
      return redirect(`/teams/new?left=${encodeURIComponent(ctx.team.name)}`);
    }
    await deleteTeam(ctx.team, form.confirmSlug ?? "");
    return redirect(`/teams/new?deleted=${encodeURIComponent(ctx.team.name)}`);
  } catch (error) {
    const refusal = teams.refusalMessage(error);
    if (refusal) return data({ intent, errors: { form: refusal }, done: null }, { status: 400 });
    throw error;
  }
}

const roleOptions = ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }));
const dateFmt = (iso: string) => iso.slice(0, 10);

export default function TeamSettings({ loaderData, actionData }: Route.ComponentProps) {
  // Only the form being sent shows "Working…": the intent (and member or invitation) it carries names it.
  const navigation = useNavigation();
  const sending = navigation.state === "submitting" ? navigation.formData : undefined;
  const busyFor = (intent: string, id?: string) =>
    sending?.get("intent") === intent && (id === undefined || sending.get("memberId") === id || sending.get("invitationId") === id);
  const { team, members, invitations, allowed, me } = loaderData;
  const errorsFor = (intent: string): Record<string, string> => (actionData?.intent === intent ? actionData.errors : {});
  return (
    <div className="space-y-5">
      <h1 className="text-2xl font-semibold">Team · {team.name}</h1>
      {actionData?.done && <FormAlert tone="info">{actionData.done}</FormAlert>}
      <FormAlert>{(actionData?.errors as Record<string, string> | undefined)?.form}</FormAlert>

      {allowed.rename && (
        <Panel title="Name">
          <Form method="post" className="flex flex-wrap items-end gap-3" noValidate>
            <input type="hidden" name="intent" value="rename" />
            <Field label="Team name" name="name" defaultValue={team.name} error={errorsFor("rename").name} className="min-w-64 flex-1" />
            <Button busy={busyFor("rename")} variant="quiet" className="mb-[2px]">Rename</Button>
          </Form>
          <p className="mt-2 text-sm text-ink-faint">The address <span className="num">/t/{team.slug}</span> stays the same, so shared links keep working.</p>
        </Panel>
      )}

      <Panel title={<>Members <span className="num text-sm font-normal text-ink-faint">({members.length})</span></>}>
        <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Members">
          <table className="w-full text-sm">
            <thead className="text-left text-ink-faint">
              <tr className="border-b border-rule-soft">
                <th className="py-1.5 pr-3 font-medium">Name</th>
                <th className="hidden py-1.5 pr-3 font-medium sm:table-cell">E-mail</th>
                <th className="py-1.5 pr-3 font-medium">Role</th>
                <th className="hidden py-1.5 pr-3 text-right font-medium sm:table-cell">Joined</th>
                {(allowed.changeRole || allowed.remove) && <th className="py-1.5 font-medium"><span className="sr-only">Actions</span></th>}
              </tr>
            </thead>
            <tbody>
              {members.map((m) => (
                <tr key={m.memberId} className="border-b border-rule-soft align-middle">
                  <td className="py-1.5 pr-3">
                    {m.name}
                    {m.userId === me && <span className="text-ink-faint"> (you)</span>}
                    <span className="block break-all text-xs text-ink-soft sm:hidden">{m.email}</span>
                  </td>
                  <td className="hidden py-1.5 pr-3 text-ink-soft sm:table-cell">{m.email}</td>
                  <td className="py-1.5 pr-3">
                    {allowed.changeRole ? (
                      <Form method="post" className="flex items-center gap-2">
                        <input type="hidden" name="intent" value="change-role" />
                        <input type="hidden" name="memberId" value={m.memberId} />
                        <label className="sr-only" htmlFor={`role-${m.memberId}`}>Role of {m.name}</label>
                        <select id={`role-${m.memberId}`} name="role" defaultValue={m.role} className="rounded border border-rule bg-panel px-2 py-1">
                          {roleOptions.map((o) => <option key={o.value} value={o.value}>{o.label}</option>)}
                        </select>
                        <Button variant="quiet" busy={busyFor("change-role", m.memberId)} className="!px-2 !py-1">Save</Button>
                      </Form>
                    ) : (
                      ROLE_LABELS[m.role]
                    )}
                  </td>
                  <td className="num hidden py-1.5 pr-3 text-right sm:table-cell">{dateFmt(m.joinedAt)}</td>
                  {(allowed.changeRole || allowed.remove) && (
                    <td className="py-1.5 text-right">
                      {allowed.remove && m.userId !== me && (
                        <Form method="post">
                          <input type="hidden" name="intent" value="remove-member" />
                          <input type="hidden" name="memberId" value={m.memberId} />
                          <Button variant="danger" busy={busyFor("remove-member", m.memberId)} className="!px-2 !py-1">Remove</Button>
                        </Form>
                      )}
                    </td>
                  )}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <dl className="mt-3 grid gap-x-4 gap-y-1 text-xs text-ink-soft sm:grid-cols-[auto_1fr]">
          {ROLES.map((r) => (
            <div key={r} className="contents">
              <dt className="font-semibold text-ink">{ROLE_LABELS[r]}</dt>
              <dd>{ROLE_SUMMARIES[r]}</dd>
            </div>
          ))}
        </dl>
      </Panel>

      {allowed.invite && (
        <Panel title="Invite by e-mail">
          <Form method="post" className="flex flex-wrap items-start gap-3" noValidate>
            <input type="hidden" name="intent" value="invite" />
            <Field label="E-mail" name="email" type="email" error={errorsFor("invite").email} className="min-w-64 flex-1" />
            <SelectField label="Role" name="role" options={roleOptions} defaultValue="analyst" error={errorsFor("invite").role} className="w-40" />
            <Button busy={busyFor("invite")} className="mt-6">Send invitation</Button>
          </Form>
          <h3 className="mt-4 text-sm font-semibold">Pending invitations</h3>
          {invitations.length === 0 ? (
            <p className="mt-1 text-sm text-ink-faint">None. Invitations are valid for 7 days.</p>
          ) : (
            <ul className="mt-1 divide-y divide-rule-soft text-sm">
              {invitations.map((inv) => (
                <li key={inv.id} className="flex flex-wrap items-center justify-between gap-2 py-1.5">
                  <span>{inv.email} <span className="text-ink-faint">as {ROLE_LABELS[inv.role]} · until <span className="num">{dateFmt(inv.expiresAt)}</span></span></span>
                  <Form method="post">
                    <input type="hidden" name="intent" value="revoke-invitation" />
                    <input type="hidden" name="invitationId" value={inv.id} />
                    <Button variant="danger" busy={busyFor("revoke-invitation", inv.id)} className="!px-2 !py-1">Revoke</Button>
                  </Form>
                </li>
              ))}
            </ul>
          )}
        </Panel>
      )}

      <Panel title="Your data">
        <div className="space-y-4 text-sm">
          {allowed.exportData && (
            <div>
              <a href={`/t/${team.slug}/export.zip`} className="inline-block rounded border border-rule bg-panel px-3 py-1.5 font-medium hover:bg-rule-soft">
                Download all of the team's data (.zip)
              </a>
              <p className="mt-1 text-ink-faint">
                One archive: team.json with the members, cars, setup versions, sessions, results and the audit log, and every
                session's raw export as it was uploaded.
              </p>
            </div>
          )}
          {allowed.audit && (
            <p>
              <Link to={`/t/${team.slug}/audit`} className="text-accent underline">Audit log</Link>: who changed what in this team, and when.
            </p>
          )}
          <Form method="post" className="space-y-2">
            <input type="hidden" name="intent" value="leave" />
            <p>Leave {team.name}: you lose access to its data; what you made stays with the team.</p>
            <label htmlFor="f-leave-confirm" className="flex items-start gap-2">
              <input id="f-leave-confirm" type="checkbox" name="confirm" value="yes" required className="mt-1" />
              <span>Yes, leave this team</span>
            </label>
            <Button variant="danger" busy={busyFor("leave")}>Leave team</Button>
          </Form>
          {allowed.deleteTeam && (
            <Form method="post" className="space-y-2 border-t border-rule-soft pt-3">
              <input type="hidden" name="intent" value="delete-team" />
              <p>
                Delete {team.name} with all its cars, setups, sessions, raw files and Brief links, for every member. This cannot
                be undone: download the archive first.
              </p>
              <Field label={`Type the team's address, ${team.slug}, to confirm`} name="confirmSlug" required autoComplete="off" error={errorsFor("delete-team").confirmSlug} className="max-w-sm" />
              <Button variant="danger" busy={busyFor("delete-team")}>Delete team</Button>
            </Form>
          )}
        </div>
      </Panel>
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Team settings · ${data?.team.name ?? "Team"} · Rakeline` }];

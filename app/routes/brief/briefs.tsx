import { data, Form, useNavigation } from "react-router";
import { z } from "zod";
import { requireMember } from "~/server/permissions.server";
import { readFormFields } from "~/server/body.server";
import { briefableComparisons, briefableSessions, createBrief, listBriefs, revokeBrief } from "~/server/brief.server";
import { BRIEF_DEFAULT_DAYS, BRIEF_MAX_DAYS } from "~/lib/brief-words";
import { Button, Field, FormAlert, SelectField } from "~/components/ui/form";
import { EmptyState, Panel } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import type { Route } from "./+types/briefs";

/** What the link shows: "session:<id>" or "comparison:<id>" (the picker's values); a bare sessionId is still read. */
const subjectSchema = z
  .string({ error: "Choose a session or a saved comparison." })
  .regex(/^(session|comparison):[A-Za-z0-9-]{1,36}$/, "Choose a session or a saved comparison.")
  .transform((v) => {
    const [kind, id] = v.split(":") as ["session" | "comparison", string];
    return kind === "session" ? { sessionId: id, comparisonId: null } : { sessionId: null, comparisonId: id };
  });

const createSchema = z.object({
  intent: z.literal("create"),
  subject: subjectSchema,
  days: z.coerce.number({ error: "Enter a number of days." }).int("Whole days only.").min(1, "At least 1 day.").max(BRIEF_MAX_DAYS, `At most ${BRIEF_MAX_DAYS} days.`),
  note: z.string().normalize("NFC").trim().max(500, "Keep the note to 500 characters.").transform((v) => v || null),
  email: z
    .string()
    .normalize("NFC")
    .trim()
    .toLowerCase()
    .max(255)
    .transform((v) => v || null)
    .pipe(z.email("Enter an e-mail address, or leave it empty.").nullable()),
});
const revokeSchema = z.object({ intent: z.literal("revoke"), briefId: z.string().min(1).max(36) });

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { share: ["create"] });
  const [briefs, sessions, comparisons] = await Promise.all([listBriefs(ctx.team.id), briefableSessions(ctx.team.id), briefableComparisons(ctx.team.id)]);
  const search = new URL(request.url).searchParams;
  const preselect = search.get("comparison") ? `comparison:${search.get("comparison")}` : search.get("session") ? `session:${search.get("session")}` : "";
  return {
    team: ctx.team,
    preselect,
    sessions,
    comparisons: comparisons.map((c) => ({ id: c.id, name: c.name, count: c.sessionIds.length })),
    briefs: briefs.map((b) => ({ ...b, expiresAt: b.expiresAt.toISOString(), revokedAt: b.revokedAt?.toISOString() ?? null, lastViewedAt: b.lastViewedAt?.toISOString() ?? null, createdAt: b.createdAt.toISOString() })),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const fields = await readFormFields(request);
  if (fields.intent === "revoke") {
    const ctx = await requireMember(request, params.teamSlug, { share: ["revoke"] });
    const parsed = revokeSchema.safeParse(fields);
    if (!parsed.success) return data({ intent: "revoke", errors: { form: "Choose a link to revoke." }, link: null }, { status: 400 });
    await revokeBrief(ctx.team.id, ctx.user.id, parsed.data.briefId);
    return { intent: "revoke", errors: {}, link: null, done: "Link revoked: it now opens nothing." };
  }
  const ctx = await requireMember(request, params.teamSlug, { share: ["create"] });
  const subject = fields.subject ?? (fields.sessionId ? `session:${fields.sessionId}` : undefined);
  const parsed = createSchema.safeParse({ ...fields, subject, intent: "create" });
  if (!parsed.success) {
    const errors: Record<string, string> = {};
    for (const issue of parsed.error.issues) errors[String(issue.path[0] ?? "form")] ??= issue.message;
    return data({ intent: "create", errors, link: null }, { status: 400 });
  }
  const made = await createBrief(ctx.team, { id: ctx.user.id, name: ctx.user.name }, {
    ...parsed.data.subject,
    note: parsed.data.note,
    days: parsed.data.days,
    recipientEmail: parsed.data.email,
  });
  return { intent: "create", errors: {}, link: made.url, done: parsed.data.email ? `Link made and sent to ${parsed.data.email}.` : "Link made." };
}

const when = (iso: string | null) => (iso ? iso.slice(0, 16).replace("T", " ") : "—");

export default function Briefs({ loaderData, actionData }: Route.ComponentProps) {
  const { briefs, sessions, comparisons, preselect } = loaderData;
  const nav = useNavigation();
  const sending = nav.state === "submitting" ? nav.formData?.get("intent") : null;
  const errors = (actionData?.errors ?? {}) as Record<string, string>;
  return (
    <div className="space-y-5">
      <header>
        <h1 className="text-2xl font-semibold">Driver briefs</h1>
        <p className="text-sm text-ink-soft">
          A Brief link shows one session, or one saved comparison, to a driver without signing in: the balance in plain
          words, the balance against speed (for a session also the side view), your note and the cautions. Nothing else of
          the team. It stops working when it expires or
          when you revoke it.
        </p>
      </header>
      {actionData && "done" in actionData && actionData.done && <FormAlert tone="info">{actionData.done}</FormAlert>}
      <FormAlert>{errors.form}</FormAlert>
      {actionData?.link && (
        <FormAlert tone="info">
          <span className="block">Copy the link now; it is not shown again (only a fingerprint of it is stored):</span>
          <code className="num block break-all" data-testid="brief-link">{actionData.link}</code>
        </FormAlert>
      )}
      <Panel title="New Brief link">
        {sessions.length === 0 ? (
          <EmptyState title="No session with figures yet">A brief shows a session's figures, so drop a log first.</EmptyState>
        ) : (
          <Form method="post" className="grid gap-x-4 sm:grid-cols-2" noValidate>
            <input type="hidden" name="intent" value="create" />
            <SelectField
              label="Session or saved comparison"
              name="subject"
              defaultValue={preselect}
              options={[
                ...sessions.map((s) => ({ value: `session:${s.id}`, label: `${s.name}${s.sessionDate ? ` (${s.sessionDate})` : ""}` })),
                ...comparisons.map((c) => ({ value: `comparison:${c.id}`, label: `Comparison: ${c.name} (${c.count} sessions)` })),
              ]}
              error={errors.subject}
            />
            <Field label="Works for (days)" name="days" type="number" min={1} max={BRIEF_MAX_DAYS} defaultValue={String(BRIEF_DEFAULT_DAYS)} required error={errors.days} />
            <Field label="Send to (e-mail, optional)" name="email" type="email" autoComplete="off" error={errors.email} hint="The driver gets the link by e-mail; with an account on that address it also shows on their dashboard." />
            <div className="mb-4 sm:col-span-2">
              <label htmlFor="f-note" className="mb-1 block text-sm font-medium">Note for the driver (optional)</label>
              <textarea id="f-note" name="note" rows={3} maxLength={500} className="block w-full rounded border border-rule bg-panel px-3 py-2" />
              {errors.note && <p className="mt-1 text-sm text-danger" role="alert">{errors.note}</p>}
            </div>
            <div className="sm:col-span-2">
              <Button busy={sending === "create"}>Make the link</Button>
            </div>
          </Form>
        )}
      </Panel>
      <Panel title="Links">
        {briefs.length === 0 ? (
          <p className="text-sm text-ink-faint">No links yet.</p>
        ) : (
          <ul className="divide-y divide-rule-soft text-sm">
            {briefs.map((b) => (
              <li key={b.id} className="flex flex-wrap items-start justify-between gap-2 py-2">
                <div>
                  <p className="font-medium">{b.kind === "comparison" ? `Comparison: ${b.sessionName}` : b.sessionName}</p>
                  <p className="text-ink-soft">
                    {b.state === "live" ? `Works until ${when(b.expiresAt)} UTC` : b.state === "revoked" ? `Revoked ${when(b.revokedAt)} UTC` : `Expired ${when(b.expiresAt)} UTC`}
                    {b.recipientEmail ? ` · sent to ${b.recipientEmail}` : ""} · by {b.createdByName ?? "a former member"}
                  </p>
                  <p className="num text-ink-soft">
                    {b.viewCount} view{b.viewCount === 1 ? "" : "s"}, last {when(b.lastViewedAt)}
                  </p>
                  {b.note && <p className="text-ink-soft">“{b.note}”</p>}
                </div>
                {b.state === "live" && (
                  <Form method="post">
                    <input type="hidden" name="intent" value="revoke" />
                    <input type="hidden" name="briefId" value={b.id} />
                    <Button variant="danger" busy={sending === "revoke" && nav.formData?.get("briefId") === b.id} className="!px-2 !py-1">Revoke</Button>
                  </Form>
                )}
              </li>
            ))}
          </ul>
        )}
      </Panel>
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Driver briefs · Rakeline" }];

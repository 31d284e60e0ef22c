import { data, Form, useNavigation } from "react-router";
import { and, asc, count, eq } from "drizzle-orm";
import { analysisSessions, venues } from "~/db/schema/sessions";
import { fieldErrors } from "~/lib/auth-schemas";
import { venueSchema } from "~/lib/sessions/venues";
import { recordAudit } from "~/server/audit.server";
import { readFormFields } from "~/server/body.server";
import { db } from "~/server/db.server";
import { can, requireMember } from "~/server/permissions.server";
import { Button, Field, FormAlert } from "~/components/ui/form";
import { EmptyState, Panel } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import type { Route } from "./+types/venues";

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { session: ["read"] });
  const rows = await db
    .select({ id: venues.id, name: venues.name, altitudeM: venues.altitudeM, notes: venues.notes, sessions: count(analysisSessions.id) })
    .from(venues)
    .leftJoin(analysisSessions, eq(analysisSessions.venueId, venues.id))
    .where(eq(venues.teamId, ctx.team.id))
    .groupBy(venues.id, venues.name, venues.altitudeM, venues.notes)
    .orderBy(asc(venues.name));
  return { team: ctx.team, venues: rows, canEdit: can(ctx.role, { session: ["upload"] }) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const ctx = await requireMember(request, params.teamSlug, { session: ["upload"] });
  const form = await readFormFields(request);
  if (form.intent === "delete") {
    const [row] = await db.select({ id: venues.id, name: venues.name }).from(venues).where(and(eq(venues.id, form.venueId ?? ""), eq(venues.teamId, ctx.team.id)));
    if (!row) throw data("No such venue in this team.", { status: 404 });
    const [used] = await db.select({ n: count() }).from(analysisSessions).where(eq(analysisSessions.venueId, row.id));
    if (used.n > 0) return data({ intent: "delete", errors: { form: `${row.name} is the venue of ${used.n} session(s), so it stays in the list.` }, done: null }, { status: 409 });
    await db.transaction(async (tx) => {
      await tx.delete(venues).where(eq(venues.id, row.id));
      await recordAudit(tx, { teamId: ctx.team.id, actorUserId: ctx.user.id, action: "venue_deleted", subjectType: "venue", subjectId: row.id, detail: { name: row.name } });
    });
    return { intent: "delete", errors: {}, done: `${row.name} removed.` };
  }
  const intent = form.intent === "update" ? "update" : "create";
  const parsed = venueSchema.safeParse(form);
  if (!parsed.success) return data({ intent, errors: fieldErrors(parsed.error), done: null }, { status: 400 });
  const { name, altitudeM, notes } = parsed.data;
  const [clash] = await db.select({ id: venues.id }).from(venues).where(and(eq(venues.teamId, ctx.team.id), eq(venues.name, name)));
  if (intent === "update") {
    const [row] = await db.select({ id: venues.id }).from(venues).where(and(eq(venues.id, form.venueId ?? ""), eq(venues.teamId, ctx.team.id)));
    if (!row) throw data("No such venue in this team.", { status: 404 });
    if (clash && clash.id !== row.id) return data({ intent, errors: { name: "Another venue of the team has that name." }, done: null }, { status: 400 });
    await db.transaction(async (tx) => {
      await tx.update(venues).set({ name, altitudeM, notes }).where(eq(venues.id, row.id));
      await recordAudit(tx, { teamId: ctx.team.id, actorUserId: ctx.user.id, action: "venue_updated", subjectType: "venue", subjectId: row.id, detail: { name, altitudeM: altitudeM ?? "none" } });
    });
    return { intent, errors: {}, done: `${name} saved.` };
  }
  if (clash) return data({ intent, errors: { name: "The team already has a venue with that name." }, done: null }, { status: 400 });
  const id = crypto.randomUUID();
  await db.transaction(async (tx) => {
    await tx.insert(venues).values({ id, teamId: ctx.team.id, name, altitudeM, notes, createdAt: new Date() });
    await recordAudit(tx, { teamId: ctx.team.id, actorUserId: ctx.user.id, action: "venue_created", subjectType: "venue", subjectId: id, detail: { name } });
  });
  return { intent, errors: {}, done: `${name} added.` };
}

export default function Venues({ loaderData, actionData }: Route.ComponentProps) {
  const { venues, canEdit } = loaderData;
  const busy = useNavigation().state === "submitting";
  const errors = (actionData?.errors ?? {}) as Record<string, string>;
  return (
    <div className="max-w-3xl space-y-5">
      <header>
        <h1 className="text-2xl font-semibold">Venues</h1>
        <p className="mt-1 text-sm text-ink-soft">
          The team's circuits, hill-climbs and test days. A venue's altitude gives the air density (ISA at that altitude) when no weather was
          written down for a session.
        </p>
      </header>
      {actionData?.done && <FormAlert tone="info">{actionData.done}</FormAlert>}
      <FormAlert>{errors.form}</FormAlert>
      {venues.length === 0 ? (
        <EmptyState title="No venues yet">
          {canEdit ? "Add the places the team runs at below; a venue typed on the Drop a log page is added here too." : "An engineer of the team adds them."}
        </EmptyState>
      ) : (
        <div className="overflow-x-auto rounded border border-rule bg-panel">
          <table className="w-full text-sm" aria-label="Venues">
            <thead className="border-b border-rule bg-rule-soft">
              <tr>
                <th scope="col" className="px-3 py-2 text-left font-medium">Venue</th>
                <th scope="col" className="px-3 py-2 text-right font-medium">Altitude</th>
                <th scope="col" className="hidden px-3 py-2 text-left font-medium sm:table-cell">Notes</th>
                <th scope="col" className="px-3 py-2 text-right font-medium">Sessions</th>
                {canEdit && <th scope="col" className="px-3 py-2"><span className="sr-only">Actions</span></th>}
              </tr>
            </thead>
            <tbody>
              {venues.map((v) => (
                <tr key={v.id} className="border-b border-rule-soft align-top last:border-0">
                  <td className="px-3 py-1.5 font-medium">{v.name}</td>
                  <td className="num px-3 py-1.5 text-right">{v.altitudeM === null ? <span className="text-ink-faint">—</span> : `${Math.round(v.altitudeM)} m`}</td>
                  <td className="hidden px-3 py-1.5 text-ink-soft sm:table-cell">{v.notes ?? ""}</td>
                  <td className="num px-3 py-1.5 text-right">{v.sessions}</td>
                  {canEdit && (
                    <td className="px-3 py-1.5 text-right">
                      <details>
                        <summary className="cursor-pointer text-accent underline">Edit</summary>
                        <Form method="post" className="mt-2 w-64 text-left">
                          <input type="hidden" name="intent" value="update" />
                          <input type="hidden" name="venueId" value={v.id} />
                          <Field label="Name" name="name" id={`name-${v.id}`} defaultValue={v.name} maxLength={80} />
                          <Field label="Altitude (m)" name="altitudeM" id={`alt-${v.id}`} inputMode="decimal" defaultValue={v.altitudeM ?? ""} />
                          <Field label="Notes" name="notes" id={`notes-${v.id}`} defaultValue={v.notes ?? ""} maxLength={200} />
                          <Button busy={busy} variant="quiet">Save</Button>
                        </Form>
                        {v.sessions === 0 && (
                          <Form method="post" className="mt-2">
                            <input type="hidden" name="intent" value="delete" />
                            <input type="hidden" name="venueId" value={v.id} />
                            <Button busy={busy} variant="danger">Remove</Button>
                          </Form>
                        )}
                      </details>
                    </td>
                  )}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      {canEdit && (
        <Panel title="Add a venue">
          <Form method="post" noValidate className="grid gap-x-3 sm:grid-cols-3">
            <input type="hidden" name="intent" value="create" />
            <Field label="Name" name="name" maxLength={80} error={actionData?.intent === "create" ? errors.name : undefined} />
            <Field label="Altitude (m)" name="altitudeM" inputMode="decimal" hint="Of the paddock, above sea level." error={actionData?.intent === "create" ? errors.altitudeM : undefined} />
            <Field label="Notes" name="notes" maxLength={200} error={actionData?.intent === "create" ? errors.notes : undefined} />
            <div><Button busy={busy}>Add venue</Button></div>
          </Form>
        </Panel>
      )}
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Venues · Rakeline" }];

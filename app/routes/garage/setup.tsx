import { Form, Link, data, redirect } from "react-router";
import { readFormFields } from "~/server/body.server";
import { deleteSetupVersion } from "~/server/garage-delete.server";
import { ConfirmDelete } from "~/components/garage/confirm-delete";
import { z } from "zod";
import { can, requireMember } from "~/server/permissions.server";
import { getCar } from "~/server/garage-cars.server";
import { duplicateSetup, getSetup, setupHistory } from "~/server/garage-setups.server";
import { displayUnits, ids, searchParamsOf } from "~/server/garage-routes.server";
import { Caution, Panel } from "~/components/ui/panels";
import { FormAlert } from "~/components/ui/form";
import { ErrorView } from "~/components/ui/error-view";
import { SetupSheet } from "~/components/garage/setup-sheet";
import { UnitsLink } from "~/components/garage/table";
import type { Route } from "./+types/setup";

const searchSchema = z.object({
  saved: z.string().regex(/^(v\d+|unchanged)$/).optional().catch(undefined),
  against: z.string().min(1).max(36).optional().catch(undefined),
});

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["read"], setup: ["read"] });
  const { carId, setupId } = ids(params, "carId", "setupId");
  const car = await getCar(ctx.team.id, carId);
  const setup = await getSetup(ctx.team.id, carId, setupId);
  const units = displayUnits(request);
  const history = await setupHistory(ctx.team.id, setup.sheetId, units);
  return {
    team: ctx.team,
    car: { id: car.id, name: car.name },
    setup,
    history,
    notice: searchParamsOf(request, searchSchema),
    units,
    canEdit: can(ctx.role, { setup: ["update"] }),
    canCreate: can(ctx.role, { setup: ["create"] }),
    canDelete: can(ctx.role, { car: ["delete"] }),
  };
}

const intentSchema = z.object({ intent: z.enum(["duplicate", "delete-setup"]).catch("duplicate"), confirm: z.string().optional() });

export async function action({ request, params }: Route.ActionArgs) {
  await requireMember(request, params.teamSlug, { setup: ["read"] });
  const { intent, confirm } = intentSchema.parse(await readFormFields(request));
  const { carId, setupId } = ids(params, "carId", "setupId");
  if (intent === "delete-setup") {
    // Deleting Garage data is the owner's (car: delete), like deleting the car itself.
    const ctx = await requireMember(request, params.teamSlug, { car: ["delete"] });
    if (confirm !== "yes") throw data("Tick the box to confirm the deletion.", { status: 400 });
    const done = await deleteSetupVersion(ctx.team.id, ctx.user.id, carId, setupId);
    return redirect(`/t/${ctx.team.slug}/garage/${carId}?${done.archived ? "archived" : "deleted"}=${encodeURIComponent(setupId)}`);
  }
  const ctx = await requireMember(request, params.teamSlug, { setup: ["create"] });
  const copy = await duplicateSetup(ctx.team.id, ctx.user.id, carId, setupId);
  return redirect(`/t/${ctx.team.slug}/garage/${carId}/setups/${copy.setupId}`);
}

export default function SetupPage({ loaderData }: Route.ComponentProps) {
  const { car, setup, history, units, canEdit, canCreate, canDelete, team, notice } = loaderData;
  const carBase = `/t/${team.slug}/garage/${car.id}`;
  const exportUrl = `/api/t/${team.slug}/cars/${car.id}/setups/${setup.id}/car.json`;
  const others = history.filter((h) => h.id !== setup.id);
  return (
    <div className="space-y-4">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <p className="text-sm text-ink-soft">
            <Link to={`/t/${team.slug}/garage`} className="underline">Garage</Link> ·{" "}
            <Link to={carBase} className="underline">{car.name}</Link>
          </p>
          <h1 className="text-2xl font-semibold">
            {setup.sheetName} <span className="num text-ink-soft">v{setup.version}</span>
          </h1>
          <p className="text-sm text-ink-soft">
            {setup.sessions ? `Used by ${setup.sessions} session${setup.sessions > 1 ? "s" : ""}.` : "No session uses this version yet."} Versions are never changed: an edit saves the next one.
          </p>
        </div>
        <div className="flex flex-wrap items-center gap-2 text-sm">
          <UnitsLink system={units} />
          <a href={exportUrl} download className="rounded border border-accent bg-accent px-3 py-1.5 font-medium text-white hover:bg-accent-strong">
            Download CAR.json
          </a>
          {canEdit && !setup.archivedAt && <Link to={`${carBase}/setups/${setup.id}/edit`} className="rounded border border-rule bg-panel px-3 py-1.5 hover:bg-rule-soft">Edit</Link>}
          {canCreate && (
            <Form method="post">
              <button className="rounded border border-rule bg-panel px-3 py-1.5 hover:bg-rule-soft">Duplicate</button>
            </Form>
          )}
          {canDelete && !setup.archivedAt && (
            <ConfirmDelete
              label={`Delete v${setup.version}`}
              intent="delete-setup"
              consequence={
                setup.sessions
                  ? `Sessions used v${setup.version}, so it is archived, not deleted: they keep it, and the setup list no longer shows it.`
                  : `v${setup.version} is deleted for good (no session used it). The other versions stay.`
              }
            />
          )}
        </div>
      </header>
      {setup.archivedAt && (
        <FormAlert tone="info">Archived on {new Date(setup.archivedAt).toISOString().slice(0, 10)}: kept for the sessions that used it; it cannot be edited.</FormAlert>
      )}
      {notice.saved === "unchanged" && <FormAlert tone="info">Nothing had changed, so no new version was written.</FormAlert>}
      {notice.saved && notice.saved !== "unchanged" && (
        <FormAlert tone="info">
          Saved as {notice.saved}; the version you edited is kept unchanged.{" "}
          {notice.against && <Link className="underline" to={`${carBase}/setups/${setup.id}/diff?against=${notice.against}`}>See what changed</Link>}
        </FormAlert>
      )}
      <Panel title="Setup">
        <SetupSheet setup={setup} units={units} />
        {(setup.frontBumpStopKind === "table" || setup.rearBumpStopKind === "table") && (
          <p className="mt-2 text-xs text-ink-soft">
            The analysis reads the bump-stop table row by row, straight lines between rows and the last row's slope
            beyond it. The CAR.json carries the table and, for tools that read a single rate, its least-squares rate
            through zero (shown as "fit").
          </p>
        )}
      </Panel>
      <Panel title="History">
        {others.length > 0 && (
          <Form method="get" action={`${carBase}/setups/${setup.id}/diff`} className="mb-2 flex items-center gap-2 text-sm">
            <label htmlFor="against">Compare v{setup.version} with</label>
            <select id="against" name="against" className="rounded border border-rule px-2 py-1">
              {others.map((h) => (
                <option key={h.id} value={h.id}>v{h.version}</option>
              ))}
            </select>
            <input type="hidden" name="units" value={units} />
            <button className="rounded border border-rule px-3 py-1 hover:bg-rule-soft">Show differences</button>
          </Form>
        )}
        <table className="w-full text-sm">
          <thead className="border-b border-rule">
            <tr>
              <th className="px-3 py-1.5 text-left font-medium">Version</th>
              <th className="px-3 py-1.5 text-left font-medium">Saved</th>
              <th className="hidden px-3 py-1.5 text-left font-medium sm:table-cell">By</th>
              <th className="px-3 py-1.5 text-left font-medium">Change</th>
              <th className="hidden px-3 py-1.5 text-right font-medium sm:table-cell">Sessions</th>
            </tr>
          </thead>
          <tbody>
            {history.map((h) => (
              <tr key={h.id} className={`border-b border-rule-soft last:border-0 ${h.id === setup.id ? "bg-rule-soft" : ""}`}>
                <td className="num px-3 py-1.5">
                  <Link to={`${carBase}/setups/${h.id}`} className="text-accent underline">v{h.version}</Link>
                  {h.archived && <span className="ml-1 text-xs text-ink-soft">archived</span>}
                </td>
                <td className="num px-3 py-1.5">{new Date(h.updatedAt).toISOString().slice(0, 16).replace("T", " ")}<span className="hidden sm:inline"> UTC</span></td>
                <td className="hidden px-3 py-1.5 sm:table-cell">{h.authorName ?? "demo seed"}</td>
                <td className="px-3 py-1.5">
                  {h.changeNote && <span className="font-medium">{h.changeNote}. </span>}
                  <span className="text-ink-soft">{h.change}</span>
                </td>
                <td className="num hidden px-3 py-1.5 text-right sm:table-cell">{h.sessions}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </Panel>
      <Caution compact />
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.setup.sheetName ?? "Setup"} · Garage · Rakeline` }];

import { Link, data } from "react-router";
import { z } from "zod";
import { requireMember } from "~/server/permissions.server";
import { getSetup } from "~/server/garage-setups.server";
import { displayUnits, ids } from "~/server/garage-routes.server";
import { diffSetups } from "~/lib/garage/diff";
import { Panel } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import { UnitsLink } from "~/components/garage/table";
import type { Route } from "./+types/setup-diff";

const searchSchema = z.object({ against: z.string().min(1).max(36).regex(/^[A-Za-z0-9-]+$/) });

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["read"], setup: ["read"] });
  const { carId, setupId } = ids(params, "carId", "setupId");
  const parsed = searchSchema.safeParse(Object.fromEntries(new URL(request.url).searchParams));
  if (!parsed.success) throw data("Choose a version to compare with (?against=<setup id>).", { status: 400 });
  const [a, b] = await Promise.all([getSetup(ctx.team.id, carId, parsed.data.against), getSetup(ctx.team.id, carId, setupId)]);
  // Older version on the left, whichever order the link named them in.
  const [before, after] = a.version <= b.version ? [a, b] : [b, a];
  const units = displayUnits(request);
  return {
    team: ctx.team,
    carId,
    before: { id: before.id, version: before.version, name: before.sheetName },
    after: { id: after.id, version: after.version, name: after.sheetName },
    rows: diffSetups(before, after, units),
    units,
  };
}

export default function SetupDiff({ loaderData }: Route.ComponentProps) {
  const { before, after, rows, units, team, carId } = loaderData;
  const base = `/t/${team.slug}/garage/${carId}/setups`;
  return (
    <div className="max-w-4xl space-y-4">
      <header className="flex items-end justify-between">
        <h1 className="text-2xl font-semibold">
          {after.name}: <Link to={`${base}/${before.id}`} className="underline">v{before.version}</Link> →{" "}
          <Link to={`${base}/${after.id}`} className="underline">v{after.version}</Link>
        </h1>
        <UnitsLink system={units} />
      </header>
      <Panel title={`${rows.length} field${rows.length === 1 ? "" : "s"} changed`}>
        {rows.length === 0 ? (
          <p className="text-sm text-ink-soft">The two versions hold the same values.</p>
        ) : (
          <table className="w-full text-sm">
            <thead className="border-b border-rule">
              <tr>
                <th className="px-3 py-1.5 text-left font-medium">Field</th>
                <th className="px-3 py-1.5 text-right font-medium">v{before.version}</th>
                <th className="px-3 py-1.5 text-right font-medium">v{after.version}</th>
                <th className="px-3 py-1.5 text-left font-medium">Unit</th>
              </tr>
            </thead>
            <tbody>
              {rows.map((r) => (
                <tr key={r.field} className="border-b border-rule-soft last:border-0">
                  <td className="px-3 py-1.5">{r.label}</td>
                  <td className="num px-3 py-1.5 text-right text-ink-soft">{r.before}</td>
                  <td className="num px-3 py-1.5 text-right font-semibold">{r.after}</td>
                  <td className="num px-3 py-1.5">{r.unit}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Panel>
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Setup differences · Garage · Rakeline" }];

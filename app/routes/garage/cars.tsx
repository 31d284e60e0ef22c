import { Form, Link } from "react-router";
import { requireMember, can } from "~/server/permissions.server";
import { carListSearchSchema, listCars, listCategories } from "~/server/garage-cars.server";
import { displayUnits, searchParamsOf } from "~/server/garage-routes.server";
import { cogFromFrontAxleMm } from "~/lib/garage/corner-weights";
import { formatQuantity } from "~/lib/garage/units";
import { EmptyState } from "~/components/ui/panels";
import { FormAlert } from "~/components/ui/form";
import { ErrorView } from "~/components/ui/error-view";
import { Num, SortHeader, UnitsLink } from "~/components/garage/table";
import type { Route } from "./+types/cars";

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["read"] });
  const query = searchParamsOf(request, carListSearchSchema);
  const [cars, categories] = await Promise.all([listCars(ctx.team.id, query), listCategories(ctx.team.id)]);
  const search = new URL(request.url).searchParams;
  const notice = search.has("archived") ? "archived" : search.has("deleted") ? "deleted" : null;
  return { cars, categories, query, notice, units: displayUnits(request), canEdit: can(ctx.role, { car: ["create"] }), team: ctx.team };
}

export default function Cars({ loaderData }: Route.ComponentProps) {
  const { cars, categories, query, notice, units, canEdit, team } = loaderData;
  const base = `/t/${team.slug}/garage`;
  const filtered = Boolean(query.q || query.category);
  return (
    <div>
      <header className="mb-4 flex flex-wrap items-center justify-between gap-3">
        <h1 className="text-2xl font-semibold">Garage</h1>
        {canEdit && (
          <div className="flex gap-2 text-sm">
            <Link to={`${base}/new`} className="rounded border border-accent bg-accent px-3 py-1.5 font-medium text-white hover:bg-accent-strong">
              New car from the scales
            </Link>
            <Link to={`${base}/import`} className="rounded border border-rule bg-panel px-3 py-1.5 font-medium hover:bg-rule-soft">
              Import a car file
            </Link>
          </div>
        )}
      </header>
      {notice === "deleted" && <FormAlert tone="info">The car was deleted with its setups.</FormAlert>}
      {notice === "archived" && (
        <FormAlert tone="info">Sessions used that car, so it was archived instead of deleted: it no longer shows here, and its sessions keep it.</FormAlert>
      )}
      <Form method="get" className="mb-3 flex flex-wrap items-end gap-3 text-sm">
        <label className="flex flex-col">
          <span className="text-ink-soft">Name or class contains</span>
          <input name="q" defaultValue={query.q ?? ""} className="rounded border border-rule bg-panel px-2 py-1" />
        </label>
        <label className="flex flex-col">
          <span className="text-ink-soft">Class</span>
          <select name="category" defaultValue={query.category ?? ""} className="rounded border border-rule bg-panel px-2 py-1">
            <option value="">Any</option>
            {categories.map((c) => (
              <option key={c}>{c}</option>
            ))}
          </select>
        </label>
        {query.sort && <input type="hidden" name="sort" value={query.sort} />}
        {query.dir && <input type="hidden" name="dir" value={query.dir} />}
        <input type="hidden" name="units" value={units} />
        <button className="rounded border border-rule bg-panel px-3 py-1 hover:bg-rule-soft">Filter</button>
        <span className="ml-auto">
          <UnitsLink system={units} />
        </span>
      </Form>
      {cars.length === 0 ? (
        filtered ? (
          <EmptyState title="No car matches">Clear the filter to see every car of {team.name}.</EmptyState>
        ) : (
          <EmptyState title="No cars yet" action={canEdit ? { to: `${base}/new`, label: "Enter a car from its corner weights" } : undefined}>
            The Garage holds each car's dimensions, corner weights and setup sheets; every analysis reads them.
            {canEdit ? " Start with the scale readings, or import a car file." : " An engineer of the team adds them."}
          </EmptyState>
        )
      ) : (
        <div className="overflow-x-auto rounded border border-rule bg-panel">
          <table className="w-full text-sm">
            <thead className="border-b border-rule bg-rule-soft">
              <tr>
                <SortHeader column="name" defaultSort="name">Car</SortHeader>
                <SortHeader column="category" defaultSort="name">Class</SortHeader>
                <SortHeader column="mass" defaultSort="name" align="right">Mass</SortHeader>
                <th scope="col" className="px-3 py-2 text-right font-medium">Static front</th>
                <SortHeader column="wheelbase" defaultSort="name" align="right">Wheelbase</SortHeader>
                <th scope="col" className="px-3 py-2 text-right font-medium">CoG behind front axle</th>
                <th scope="col" className="px-3 py-2 text-right font-medium">Setup sheets</th>
                <SortHeader column="updated" defaultSort="name" align="right">Changed</SortHeader>
              </tr>
            </thead>
            <tbody>
              {cars.map((car) => (
                <tr key={car.id} className="border-b border-rule-soft last:border-0">
                  <td className="px-3 py-1.5">
                    <Link to={`${base}/${car.id}${units === "imperial" ? "?units=imperial" : ""}`} className="font-medium text-accent underline">
                      {car.name}
                    </Link>
                  </td>
                  <td className="px-3 py-1.5">{car.category ?? "—"}</td>
                  <Num>{formatQuantity(car.massKg, "mass", units)}</Num>
                  <Num>{car.staticFrontWeightPct.toFixed(1)} %</Num>
                  <Num>{formatQuantity(car.wheelbaseMm, "length", units, units === "metric" ? 0 : 2)}</Num>
                  <Num>{formatQuantity(cogFromFrontAxleMm(car.wheelbaseMm, car.staticFrontWeightPct), "length", units, units === "metric" ? 0 : 2)}</Num>
                  <Num>{car.setupSheets}</Num>
                  <Num>{new Date(car.updatedAt).toISOString().slice(0, 10)}</Num>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Garage · Rakeline" }];

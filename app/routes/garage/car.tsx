import { Form, Link, data, redirect } from "react-router";
import { z } from "zod";
import { can, requireMember } from "~/server/permissions.server";
import { duplicateCar, getCar } from "~/server/garage-cars.server";
import { SETUP_SORTS, duplicateSetup, listSetupSheets } from "~/server/garage-setups.server";
import { displayUnits, ids, searchParamsOf } from "~/server/garage-routes.server";
import { cogFromFrontAxleMm, summariseCornerWeights, withFuelChange } from "~/lib/garage/corner-weights";
import { formatQuantity, type UnitSystem } from "~/lib/garage/units";
import { Caution, EmptyState, FigureList, Panel } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import { Num, SortHeader, UnitsLink } from "~/components/garage/table";
import { CogDiagram } from "~/components/garage/cog-diagram";
import { ConfirmDelete } from "~/components/garage/confirm-delete";
import { FormAlert } from "~/components/ui/form";
import { deleteCar } from "~/server/garage-delete.server";
import type { Route } from "./+types/car";
import { readFormFields } from "~/server/body.server";

const searchSchema = z.object({
  q: z.string().trim().max(80).optional().catch(undefined),
  sort: z.enum(SETUP_SORTS).optional().catch(undefined),
  dir: z.enum(["asc", "desc"]).optional().catch(undefined),
});
const intentSchema = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("duplicate-car") }),
  z.object({ intent: z.literal("duplicate-setup"), setupId: z.string().min(1).max(36) }),
  z.object({ intent: z.literal("delete-car"), confirm: z.literal("yes", { error: "Tick the box to confirm the deletion." }) }),
]);

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["read"] });
  const { carId } = ids(params, "carId");
  const car = await getCar(ctx.team.id, carId);
  const query = searchParamsOf(request, searchSchema);
  // Setup sheets belong to the car: whoever may read the car (drivers included) reads its setups.
  const sheets = await listSetupSheets(ctx.team.id, carId, query);
  return {
    team: ctx.team,
    car,
    sheets,
    query,
    units: displayUnits(request),
    canEditCar: can(ctx.role, { car: ["update"] }),
    canCreateSetup: can(ctx.role, { setup: ["create"] }),
    canDelete: can(ctx.role, { car: ["delete"] }),
    notice: new URL(request.url).searchParams.has("archived") ? "archived" : new URL(request.url).searchParams.has("deleted") ? "deleted" : null,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["read"] });
  const { carId } = ids(params, "carId");
  const parsed = intentSchema.safeParse(await readFormFields(request));
  if (!parsed.success) {
    const confirmIssue = parsed.error.issues.find((i) => i.path[0] === "confirm");
    throw data(confirmIssue ? confirmIssue.message : "Unknown action: duplicate-car, duplicate-setup (with a setupId) or delete-car.", { status: 400 });
  }
  const base = `/t/${ctx.team.slug}/garage`;
  if (parsed.data.intent === "delete-car") {
    await requireMember(request, params.teamSlug, { car: ["delete"] });
    const done = await deleteCar(ctx.team.id, ctx.user.id, carId);
    return redirect(`${base}?${done.archived ? "archived" : "deleted"}=${encodeURIComponent(carId)}`);
  }
  if (parsed.data.intent === "duplicate-car") {
    await requireMember(request, params.teamSlug, { car: ["create"] });
    const newId = await duplicateCar(ctx.team.id, ctx.user.id, carId);
    return redirect(`${base}/${newId}`);
  }
  await requireMember(request, params.teamSlug, { setup: ["create"] });
  const { setupId } = await duplicateSetup(ctx.team.id, ctx.user.id, carId, parsed.data.setupId);
  return redirect(`${base}/${carId}/setups/${setupId}`);
}

function Figures({ car, units }: { car: Route.ComponentProps["loaderData"]["car"]; units: UnitSystem }) {
  const corners =
    car.cornerFlKg !== null && car.cornerFrKg !== null && car.cornerRlKg !== null && car.cornerRrKg !== null
      ? summariseCornerWeights({ fl: car.cornerFlKg, fr: car.cornerFrKg, rl: car.cornerRlKg, rr: car.cornerRrKg }, car.wheelbaseMm)
      : null;
  const len = (v: number | null) => formatQuantity(v, "length", units, units === "metric" ? 0 : 2);
  const rows: [string, string][] = [
    ["Total mass", formatQuantity(car.massKg, "mass", units)],
    ["Static front", `${car.staticFrontWeightPct.toFixed(2)} %`],
    ["Cross weight (FR + RL) / total", corners ? `${corners.crossPct.toFixed(2)} %` : "— (no corner weights)"],
    ["CoG behind the front axle (wheelbase × rear fraction)", len(cogFromFrontAxleMm(car.wheelbaseMm, car.staticFrontWeightPct))],
    ["CoG height", len(car.cogHeightMm)],
    ["Wheelbase", len(car.wheelbaseMm)],
    ["Track front / rear", `${len(car.trackFrontMm)} / ${len(car.trackRearMm)}`],
    ["Steering ratio (overall)", `${car.steeringRatio} : 1`],
    ["Tyre vertical stiffness", formatQuantity(car.tyreVerticalStiffnessNPerMm, "springRate", units)],
    ["Fuel tank behind the front axle", len(car.fuelTankFromFrontAxleMm)],
    ["Fuel density", `${car.fuelDensityKgPerL} kg/L`],
  ];
  if (car.fuelTankFromFrontAxleMm !== null) {
    // What 10 L of fuel burnt does to the static figures (lever rule about the axles).
    const burn = withFuelChange({
      massKg: car.massKg,
      staticFrontPct: car.staticFrontWeightPct,
      wheelbaseMm: car.wheelbaseMm,
      fuelChangeL: -10,
      fuelDensityKgPerL: car.fuelDensityKgPerL,
      tankFromFrontAxleMm: car.fuelTankFromFrontAxleMm,
    });
    const shift = burn.staticFrontPct - car.staticFrontWeightPct;
    rows.push(["Per 10 L of fuel burnt", `${formatQuantity(burn.fuelMassChangeKg, "mass", units, 2)}, front ${shift >= 0 ? "+" : ""}${shift.toFixed(2)} pp`]);
  }
  return (
    <div className="grid gap-4 md:grid-cols-[1fr_auto]">
      <FigureList rows={rows} className="grid grid-cols-[1fr_auto] gap-x-6 gap-y-0.5 text-sm" />
      <div className="space-y-3">
        <CogDiagram wheelbaseMm={car.wheelbaseMm} cogFromFrontMm={cogFromFrontAxleMm(car.wheelbaseMm, car.staticFrontWeightPct)} cogHeightMm={car.cogHeightMm} />
        {corners && (
          <figure className="text-sm">
            <figcaption className="mb-1 text-ink-soft">
              Scales: driver {car.weighedWithDriver ? "in" : "out"}, fuel {formatQuantity(car.weighedFuelL, "volume", units)}
            </figcaption>
            <div className="num grid grid-cols-2 gap-1 text-right">
              {[car.cornerFlKg, car.cornerFrKg, car.cornerRlKg, car.cornerRrKg].map((w, i) => (
                <div key={i} className={`rounded border px-3 py-1 ${i < 2 ? "border-front" : "border-rear"}`}>
                  <span className="float-left text-ink-faint">{["FL", "FR", "RL", "RR"][i]}</span> {formatQuantity(w, "mass", units)}
                </div>
              ))}
            </div>
          </figure>
        )}
      </div>
    </div>
  );
}

export default function CarPage({ loaderData }: Route.ComponentProps) {
  const { car, sheets, team, units, canEditCar, canCreateSetup, canDelete, query, notice } = loaderData;
  const base = `/t/${team.slug}/garage/${car.id}`;
  const suffix = units === "imperial" ? "?units=imperial" : "";
  return (
    <div className="space-y-4">
      <header className="flex flex-wrap items-center justify-between gap-3">
        <div>
          <p className="text-sm text-ink-soft">
            <Link to={`/t/${team.slug}/garage`} className="underline">Garage</Link> · {car.category ?? "no class given"}
          </p>
          <h1 className="text-2xl font-semibold">{car.name}</h1>
        </div>
        <div className="flex flex-wrap items-center gap-2 text-sm">
          <UnitsLink system={units} />
          {canEditCar && !car.archivedAt && (
            <>
              <Link to={`${base}/edit`} className="rounded border border-rule bg-panel px-3 py-1.5 hover:bg-rule-soft">Edit car</Link>
              <Form method="post">
                <button name="intent" value="duplicate-car" className="rounded border border-rule bg-panel px-3 py-1.5 hover:bg-rule-soft">
                  Duplicate car
                </button>
              </Form>
            </>
          )}
          {canDelete && !car.archivedAt && (
            <ConfirmDelete
              label="Delete car"
              intent="delete-car"
              consequence="The car and all its setup sheets are deleted for good. If sessions used it, it is archived instead: it leaves the Garage and those sessions keep it."
            />
          )}
        </div>
      </header>
      {notice === "deleted" && <FormAlert tone="info">The setup version was deleted; the others stay.</FormAlert>}
      {notice === "archived" && <FormAlert tone="info">Sessions used that setup version, so it was archived instead of deleted; they keep it.</FormAlert>}
      {car.archivedAt && (
        <FormAlert tone="info">
          Archived on {new Date(car.archivedAt).toISOString().slice(0, 10)}: sessions used this car, so it is kept for them but no longer listed in the Garage.
        </FormAlert>
      )}
      <Panel title="Car and corner weights">
        <Figures car={car} units={units} />
        {!car.weighedWithDriver && car.cornerFlKg !== null && (
          <p className="mt-2 text-xs text-caution">Weighed without the driver: the analysis uses this mass for load transfer, so add the driver or re-weigh with them in.</p>
        )}
      </Panel>
      <Panel
        title="Setup sheets"
        actions={canCreateSetup && <Link to={`${base}/setups/new`} className="rounded border border-accent bg-accent px-3 py-1 text-sm text-white hover:bg-accent-strong">New setup</Link>}
      >
        <Form method="get" className="mb-2 flex gap-2 text-sm">
          <input name="q" aria-label="Setup name contains" placeholder="Name contains" defaultValue={query.q ?? ""} className="rounded border border-rule px-2 py-1" />
          <input type="hidden" name="units" value={units} />
          <button className="rounded border border-rule px-3 py-1 hover:bg-rule-soft">Filter</button>
        </Form>
        {sheets.length === 0 ? (
          <EmptyState title={query.q ? "No setup matches" : "No setup yet"} action={canCreateSetup && !query.q ? { to: `${base}/setups/new`, label: "Enter the first setup" } : undefined}>
            A setup sheet holds springs, motion ratios, bump stops, static readings and aero settings. Each change becomes a version once a session has used it.
          </EmptyState>
        ) : (
          <table className="w-full text-sm">
            <thead className="border-b border-rule">
              <tr>
                <SortHeader column="name" defaultSort="updated" defaultDir="desc">Setup</SortHeader>
                <SortHeader column="version" defaultSort="updated" defaultDir="desc" align="right">Latest version</SortHeader>
                <th className="hidden px-3 py-2 text-right font-medium sm:table-cell">Springs F / R</th>
                <th className="hidden px-3 py-2 text-right font-medium sm:table-cell">Rear wing</th>
                <th className="hidden px-3 py-2 text-right font-medium md:table-cell">Sessions</th>
                <SortHeader column="updated" defaultSort="updated" defaultDir="desc" align="right" className="hidden sm:table-cell">Changed</SortHeader>
                {canCreateSetup && <th className="px-3 py-2"><span className="sr-only">Actions</span></th>}
              </tr>
            </thead>
            <tbody>
              {sheets.map((s) => (
                <tr key={s.sheetId} className="border-b border-rule-soft last:border-0">
                  <td className="px-3 py-1.5">
                    <Link to={`${base}/setups/${s.setupId}${suffix}`} className="font-medium text-accent underline">{s.name}</Link>
                  </td>
                  <Num>v{s.latestVersion} of {s.versions}</Num>
                  <Num className="hidden sm:table-cell">
                    {formatQuantity(s.frontSpringRateNPerMm, "springRate", units, 0)} / {formatQuantity(s.rearSpringRateNPerMm, "springRate", units, 0)}
                  </Num>
                  <Num className="hidden sm:table-cell">{s.rearWingAngleDeg !== null ? `${s.rearWingAngleDeg} deg` : (s.rearWingStep ?? "—")}</Num>
                  <Num className="hidden md:table-cell">{s.sessions}</Num>
                  <Num className="hidden sm:table-cell">{new Date(s.updatedAt).toISOString().slice(0, 10)} {s.authorName ?? ""}</Num>
                  {canCreateSetup && (
                    <td className="px-3 py-1.5 text-right">
                      <Form method="post">
                        <input type="hidden" name="setupId" value={s.setupId} />
                        <button name="intent" value="duplicate-setup" className="text-accent underline">Duplicate</button>
                      </Form>
                    </td>
                  )}
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Panel>
      <Caution compact />
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.car.name ?? "Car"} · Garage · Rakeline` }];

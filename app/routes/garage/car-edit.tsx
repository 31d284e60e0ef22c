import { data, redirect } from "react-router";
import { requireMember } from "~/server/permissions.server";
import { carRowValues, getCar, updateCar } from "~/server/garage-cars.server";
import { ids } from "~/server/garage-routes.server";
import { CAR_FIELDS } from "~/lib/garage/fields";
import { carFormSchema, fieldErrors } from "~/lib/garage/schemas";
import { applyExactNumbers, keepUnchangedNumbers, unitSystemOf } from "~/lib/garage/form-data";
import { CarForm } from "~/components/garage/car-form";
import { ErrorView } from "~/components/ui/error-view";
import type { Route } from "./+types/car-edit";
import { readFormFields } from "~/server/body.server";

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["update"] });
  const { carId } = ids(params, "carId");
  const car = await getCar(ctx.team.id, carId);
  return { team: ctx.team, car };
}

export async function action({ request, params }: Route.ActionArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["update"] });
  const { carId } = ids(params, "carId");
  const current = await getCar(ctx.team.id, carId);
  const fields = await readFormFields(request);
  const system = unitSystemOf(fields.units);
  const parsed = carFormSchema(system).safeParse(keepUnchangedNumbers(applyExactNumbers(fields, CAR_FIELDS, system), CAR_FIELDS, current, system));
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error) }, { status: 400 });
  await updateCar(ctx.team.id, carId, carRowValues(parsed.data), ctx.user.id);
  return redirect(`/t/${ctx.team.slug}/garage/${carId}`);
}

export default function EditCar({ loaderData, actionData }: Route.ComponentProps) {
  const { car, team } = loaderData;
  // Without corner weights, mass and front % are the stated values and stay editable.
  return (
    <div className="max-w-5xl">
      <h1 className="mb-4 text-2xl font-semibold">Edit {car.name}</h1>
      <CarForm
        draftKey={`${team.slug}:car:${car.id}`}
        initial={{ ...car, massKg: car.cornerFlKg === null ? car.massKg : null, staticFrontWeightPct: car.cornerFlKg === null ? car.staticFrontWeightPct : null }}
        initialSystem="metric"
        serverErrors={actionData?.errors}
        formError={actionData?.errors ? "Some values need a look; each is marked below. Nothing was changed." : undefined}
        submitLabel="Save car"
      />
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Edit ${data?.car.name ?? "car"} · Garage · Rakeline` }];

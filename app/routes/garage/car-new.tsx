import { data, redirect } from "react-router";
import { requireMember } from "~/server/permissions.server";
import { carRowValues, createCar } from "~/server/garage-cars.server";
import { carFormSchema, fieldErrors } from "~/lib/garage/schemas";
import { applyExactNumbers, unitSystemOf } from "~/lib/garage/form-data";
import { CAR_FIELDS } from "~/lib/garage/fields";
import { CarForm } from "~/components/garage/car-form";
import { Caution } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import type { Route } from "./+types/car-new";
import { readFormFields } from "~/server/body.server";

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["create"] });
  return { team: ctx.team };
}

export async function action({ request, params }: Route.ActionArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["create"] });
  const fields = await readFormFields(request);
  const system = unitSystemOf(fields.units);
  const parsed = carFormSchema(system).safeParse(applyExactNumbers(fields, CAR_FIELDS, system));
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error) }, { status: 400 });
  const carId = await createCar(ctx.team.id, ctx.user.id, carRowValues(parsed.data));
  return redirect(`/t/${ctx.team.slug}/garage/${carId}`);
}

export default function NewCar({ loaderData, actionData }: Route.ComponentProps) {
  return (
    <div className="max-w-5xl">
      <h1 className="mb-1 text-2xl font-semibold">New car</h1>
      <p className="mb-4 text-sm text-ink-soft">
        Enter the dimensions and the four scale readings; Rakeline works out mass, static front %, cross weight and where
        the CoG sits. Nothing is saved until you press the button, but a draft stays in this browser.
      </p>
      <CarForm
        draftKey={`${loaderData.team.slug}:car:new`}
        initial={{ fuelDensityKgPerL: 0.745 }}
        initialSystem="metric"
        serverErrors={actionData?.errors}
        formError={actionData?.errors ? "Some values need a look; each is marked below." : undefined}
        submitLabel="Create car"
      />
      <div className="mt-6">
        <Caution compact />
      </div>
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = () => [{ title: "New car · Garage · Rakeline" }];

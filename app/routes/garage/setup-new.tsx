import { data, redirect } from "react-router";
import { z } from "zod";
import { requireMember } from "~/server/permissions.server";
import { getCar } from "~/server/garage-cars.server";
import { createSetupSheet, getSetup, setupRowValues } from "~/server/garage-setups.server";
import { ids, searchParamsOf } from "~/server/garage-routes.server";
import { fieldErrors, setupFormSchema } from "~/lib/garage/schemas";
import { applyExactNumbers, unitSystemOf } from "~/lib/garage/form-data";
import { SETUP_FIELDS } from "~/lib/garage/fields";
import { SetupForm, type SetupInitial } from "~/components/garage/setup-form";
import { Caution } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import type { Route } from "./+types/setup-new";
import { readFormFields } from "~/server/body.server";

const searchSchema = z.object({ from: z.string().min(1).max(36).optional().catch(undefined) });

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { setup: ["create"] });
  const { carId } = ids(params, "carId");
  const car = await getCar(ctx.team.id, carId);
  const { from } = searchParamsOf(request, searchSchema);
  // ?from=<setup id> starts from an existing version of this car (a copy to change).
  const source = from ? await getSetup(ctx.team.id, carId, from) : null;
  const initial: SetupInitial = source ? { ...source, name: `${source.sheetName} (copy)`, changeNote: null } : {};
  return { team: ctx.team, car: { id: car.id, name: car.name }, initial };
}

export async function action({ request, params }: Route.ActionArgs) {
  const ctx = await requireMember(request, params.teamSlug, { setup: ["create"] });
  const { carId } = ids(params, "carId");
  const fields = await readFormFields(request);
  const system = unitSystemOf(fields.units);
  const parsed = setupFormSchema(system).safeParse(applyExactNumbers(fields, SETUP_FIELDS, system));
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error) }, { status: 400 });
  const { sheetName, values } = setupRowValues(parsed.data);
  const { setupId } = await createSetupSheet(ctx.team.id, ctx.user.id, carId, sheetName, values);
  return redirect(`/t/${ctx.team.slug}/garage/${carId}/setups/${setupId}`);
}

export default function NewSetup({ loaderData, actionData }: Route.ComponentProps) {
  const { car, team, initial } = loaderData;
  return (
    <div className="max-w-5xl">
      <h1 className="mb-4 text-2xl font-semibold">New setup for {car.name}</h1>
      <SetupForm
        draftKey={`${team.slug}:setup:new:${car.id}`}
        initial={initial}
        initialSystem="metric"
        serverErrors={actionData?.errors}
        formError={actionData?.errors ? "Some values need a look; each is marked below." : undefined}
        mode="new"
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

export const meta: Route.MetaFunction = () => [{ title: "New setup · Garage · Rakeline" }];

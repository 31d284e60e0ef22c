import { data, redirect } from "react-router";
import { requireMember } from "~/server/permissions.server";
import { getSetup, saveSetupEdit, setupRowValues } from "~/server/garage-setups.server";
import { ids } from "~/server/garage-routes.server";
import { SETUP_FIELDS } from "~/lib/garage/fields";
import { fieldErrors, setupFormSchema } from "~/lib/garage/schemas";
import { applyExactNumbers, keepUnchangedNumbers, unitSystemOf } from "~/lib/garage/form-data";
import { SetupForm } from "~/components/garage/setup-form";
import { ErrorView } from "~/components/ui/error-view";
import type { Route } from "./+types/setup-edit";
import { readFormFields } from "~/server/body.server";

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { setup: ["update"] });
  const { carId, setupId } = ids(params, "carId", "setupId");
  const setup = await getSetup(ctx.team.id, carId, setupId);
  return { team: ctx.team, setup };
}

export async function action({ request, params }: Route.ActionArgs) {
  const ctx = await requireMember(request, params.teamSlug, { setup: ["update"] });
  const { carId, setupId } = ids(params, "carId", "setupId");
  const current = await getSetup(ctx.team.id, carId, setupId);
  const fields = await readFormFields(request);
  const system = unitSystemOf(fields.units);
  const parsed = setupFormSchema(system).safeParse(keepUnchangedNumbers(applyExactNumbers(fields, SETUP_FIELDS, system), SETUP_FIELDS, current, system));
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error) }, { status: 400 });
  const { sheetName, values } = setupRowValues(parsed.data);
  const saved = await saveSetupEdit({
    teamId: ctx.team.id,
    userId: ctx.user.id,
    carId,
    setupId,
    sheetName,
    values,
  });
  const to = `/t/${ctx.team.slug}/garage/${carId}/setups/${saved.setupId}`;
  return redirect(saved.newVersion ? `${to}?saved=v${saved.version}&against=${setupId}` : `${to}?saved=unchanged`);
}

export default function EditSetup({ loaderData, actionData }: Route.ComponentProps) {
  const { setup, team } = loaderData;
  return (
    <div className="max-w-5xl">
      <h1 className="mb-4 text-2xl font-semibold">
        Edit {setup.sheetName} <span className="num text-ink-soft">v{setup.version}</span>
      </h1>
      <SetupForm
        draftKey={`${team.slug}:setup:${setup.id}`}
        initial={{ ...setup, name: setup.sheetName, changeNote: null }}
        initialSystem="metric"
        serverErrors={actionData?.errors}
        formError={actionData?.errors ? "Some values need a look; each is marked below. Nothing was saved." : undefined}
        mode="edit"
        used={setup.sessions}
      />
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Edit setup · Garage · Rakeline" }];

import { Form, data, redirect } from "react-router";
import { requireMember } from "~/server/permissions.server";
import { importCarFile } from "~/server/garage-io.server";
import { Button, FormAlert } from "~/components/ui/form";
import { Caution } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import type { Route } from "./+types/import";

/** Car files are a few hundred bytes; anything this large is not one. */
const MAX_CAR_FILE_BYTES = 64 * 1024;

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["create"] });
  return { team: ctx.team };
}

export async function action({ request, params }: Route.ActionArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["create"] });
  const form = await request.formData();
  const file = form.get("file");
  const pasted = form.get("text");
  let text = typeof pasted === "string" ? pasted : "";
  if (file instanceof File && file.size > 0) {
    if (file.size > MAX_CAR_FILE_BYTES) return data({ errors: [`The file is ${file.size} bytes; a car file is a few hundred. Choose the CAR.json itself.`] }, { status: 400 });
    text = await file.text();
  }
  if (!text.trim()) return data({ errors: ["Choose a CAR.json file or paste its text."] }, { status: 400 });
  const setupName = typeof form.get("setupName") === "string" && String(form.get("setupName")).trim() ? String(form.get("setupName")).trim().slice(0, 80) : "Imported";
  const result = await importCarFile(ctx.team.id, ctx.user.id, text, setupName);
  if (!result.ok) return data({ errors: result.errors }, { status: 400 });
  return redirect(`/t/${ctx.team.slug}/garage/${result.carId}/setups/${result.setupId}`);
}

export default function ImportCar({ actionData }: Route.ComponentProps) {
  const errors = actionData?.errors;
  return (
    <div className="max-w-3xl">
      <h1 className="mb-1 text-2xl font-semibold">Import a car file</h1>
      <p className="mb-4 text-sm text-ink-soft">
        A CAR.json as the command-line analysis reads it becomes a new car with one setup (version 1). Corner weights are
        not part of the file: the car keeps the stated mass and front %, and you can add the scale readings later.
      </p>
      {errors && (
        <FormAlert>
          <p className="font-medium">The file was not imported; nothing was changed:</p>
          <ul className="ml-5 list-disc">
            {errors.map((e) => (
              <li key={e}>{e}</li>
            ))}
          </ul>
        </FormAlert>
      )}
      <Form method="post" encType="multipart/form-data" className="space-y-4">
        <div>
          <label htmlFor="f-file" className="mb-1 block text-sm font-medium">CAR.json file</label>
          <input id="f-file" name="file" type="file" accept=".json,application/json" className="text-sm" />
        </div>
        <div>
          <label htmlFor="f-text" className="mb-1 block text-sm font-medium">…or paste its text</label>
          <textarea id="f-text" name="text" rows={10} className="num block w-full rounded border border-rule bg-panel px-2.5 py-1.5 text-xs" />
        </div>
        <div>
          <label htmlFor="f-setupName" className="mb-1 block text-sm font-medium">Name for the setup</label>
          <input id="f-setupName" name="setupName" defaultValue="Imported" maxLength={80} className="rounded border border-rule bg-panel px-2.5 py-1.5" />
        </div>
        <Button>Import</Button>
      </Form>
      <div className="mt-6">
        <Caution compact />
      </div>
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Import a car file · Garage · Rakeline" }];

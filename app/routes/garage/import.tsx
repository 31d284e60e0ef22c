import { Form, data, redirect } from "react-router";
import { requireMember } from "~/server/permissions.server";
import { importCarFile, MAX_CAR_FILE_BYTES, setupNameOf } from "~/server/garage-io.server";
import { pageRefusalMessage, readForm, type ReadFormResult } from "~/server/body.server";
import { Button, FormAlert } from "~/components/ui/form";
import { Caution } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import type { Route } from "./+types/import";

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["create"] });
  return { team: ctx.team };
}

export async function action({ request, params }: Route.ActionArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["create"] });
  // A car file is a few hundred bytes: the file and the pasted text are each capped at 64 KiB before
  // anything is parsed (a larger one is refused with 413).
  let form: ReadFormResult;
  try {
    form = await readForm(request, {
      maxBytes: 3 * MAX_CAR_FILE_BYTES,
      maxFieldBytes: MAX_CAR_FILE_BYTES,
      maxFields: 10,
      maxFiles: 1,
      maxFileBytes: MAX_CAR_FILE_BYTES,
    });
  } catch (error) {
    const refusal = pageRefusalMessage(error);
    if (!refusal) throw error;
    return data({ errors: [`${refusal.message} A car file is a few hundred bytes: choose the CAR.json itself.`] }, { status: refusal.status });
  }
  const { fields, files } = form;
  const file = files.file;
  const text = file && file.bytes.length > 0 ? file.bytes.toString("utf8") : (fields.text ?? "");
  if (!text.trim()) return data({ errors: ["Choose a CAR.json file or paste its text."] }, { status: 400 });
  const setupName = setupNameOf(fields.setupName);
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

import { Form, data, redirect } from "react-router";
import { requireMember } from "~/server/permissions.server";
import { z } from "zod";
import { carsNamed, importCarFile, MAX_CAR_FILE_BYTES, readCarFile, setupNameOf, type ImportTarget } from "~/server/garage-io.server";
import { getCar } from "~/server/garage-cars.server";
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
  const read = readCarFile(text);
  if (!read.ok) return data({ errors: read.errors }, { status: 400 });
  // A car of the same name is already here: offer the next version of one of its setups instead of a second car.
  const choice = importChoiceSchema.safeParse(fields.onto ?? "");
  if (!choice.success) {
    const same = await carsNamed(ctx.team.id, read.name);
    if (same.length > 0) return data({ offer: { cars: same, text, setupName: fields.setupName ?? "" } }, { status: 200 });
  }
  const target = choice.success ? choice.data : { kind: "new-car" as const };
  if (target.kind !== "new-car") await getCar(ctx.team.id, target.carId);
  const result = await importCarFile(ctx.team.id, ctx.user.id, text, setupName, target);
  if (!result.ok) return data({ errors: result.errors }, { status: result.status ?? 400 });
  const notice = result.unchanged ? "?saved=unchanged" : target.kind === "new-version" ? `?saved=v${result.version}` : "";
  return redirect(`/t/${ctx.team.slug}/garage/${result.carId}/setups/${result.setupId}${notice}`);
}

/** "new-car", "sheet:<carId>:<sheetId>" (next version of that sheet) or "car:<carId>" (a new sheet on that car). */
const importChoiceSchema = z.string().transform((raw, ctx): ImportTarget => {
  if (raw === "new-car") return { kind: "new-car" };
  const sheet = /^sheet:([A-Za-z0-9-]{1,36}):([A-Za-z0-9-]{1,36})$/.exec(raw);
  if (sheet) return { kind: "new-version", carId: sheet[1], sheetId: sheet[2] };
  const car = /^car:([A-Za-z0-9-]{1,36})$/.exec(raw);
  if (car) return { kind: "new-sheet", carId: car[1] };
  ctx.addIssue({ code: "custom", message: "Choose where the file goes." });
  return z.NEVER;
});

export default function ImportCar({ actionData }: Route.ComponentProps) {
  const errors = actionData && "errors" in actionData ? actionData.errors : undefined;
  const offer = actionData && "offer" in actionData ? actionData.offer : undefined;
  if (offer) return <ReimportChoice offer={offer} />;
  return (
    <div className="max-w-3xl">
      <h1 className="mb-1 text-2xl font-semibold">Import a car file</h1>
      <p className="mb-4 text-sm text-ink-soft">
        A CAR.json as the command-line analysis reads it becomes a new car with one setup (version 1). A file the Garage
        exported also brings back the class, tracks, corner weights, ride heights, anti-roll bars, aero and notes. When a
        car of the same name is already here, you can add the file as the next version of one of its setups instead.
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
          <input id="f-setupName" name="setupName" maxLength={80} placeholder="the file's own, else Imported" className="w-full max-w-sm rounded border border-rule bg-panel px-2.5 py-1.5" />
        </div>
        <Button>Import</Button>
      </Form>
      <div className="mt-6">
        <Caution compact />
      </div>
    </div>
  );
}

type Offer = {
  cars: Array<{ id: string; name: string; sheets: Array<{ id: string; name: string; latestVersion: number }> }>;
  text: string;
  setupName: string;
};

function ReimportChoice({ offer }: { offer: Offer }) {
  const first = offer.cars[0];
  const preferred = first.sheets.find((s) => s.name === offer.setupName) ?? first.sheets[0];
  const defaultChoice = preferred ? `sheet:${first.id}:${preferred.id}` : `car:${first.id}`;
  return (
    <div className="max-w-3xl">
      <h1 className="mb-1 text-2xl font-semibold">{first.name} is already in the Garage</h1>
      <p className="mb-4 text-sm text-ink-soft">
        Choose where the file goes. Nothing is stored until you do. The car's own values (mass, wheelbase, corner weights
        and the rest) stay as they are when the file goes onto a car that is here; edit the car to change them.
      </p>
      <Form method="post" encType="multipart/form-data" className="space-y-4">
        <input type="hidden" name="text" value={offer.text} />
        <input type="hidden" name="setupName" value={offer.setupName} />
        <fieldset className="space-y-2">
          <legend className="mb-1 text-sm font-medium">Import the file as</legend>
          {offer.cars.map((car) => (
            <div key={car.id} className="space-y-2">
              {car.sheets.map((sheet) => (
                <label key={sheet.id} className="flex items-start gap-2">
                  <input type="radio" name="onto" value={`sheet:${car.id}:${sheet.id}`} defaultChecked={defaultChoice === `sheet:${car.id}:${sheet.id}`} className="mt-1" />
                  <span>
                    the next version of <strong>{sheet.name}</strong> <span className="num">(v{sheet.latestVersion + 1})</span> on {car.name}
                  </span>
                </label>
              ))}
              <label className="flex items-start gap-2">
                <input type="radio" name="onto" value={`car:${car.id}`} defaultChecked={defaultChoice === `car:${car.id}`} className="mt-1" />
                <span>a new setup on {car.name}</span>
              </label>
            </div>
          ))}
          <label className="flex items-start gap-2">
            <input type="radio" name="onto" value="new-car" className="mt-1" />
            <span>a separate new car</span>
          </label>
        </fieldset>
        <Button>Import</Button>
      </Form>
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Import a car file · Garage · Rakeline" }];

import { Form } from "react-router";
import { CAR_FIELDS, type NumberFieldSpec } from "~/lib/garage/fields";
import { carFormSchema } from "~/lib/garage/schemas";
import { summariseCornerWeights } from "~/lib/garage/corner-weights";
import { NOT_A_NUMBER, formatForInput, parseTypedNumber, toStored, type UnitSystem } from "~/lib/garage/units";
import { Button, FormAlert } from "~/components/ui/form";
import { FigureList } from "~/components/ui/panels";
import { DraftNotice, NumberInput, TextInput, UnitSwitch } from "./inputs";
import { useGarageForm } from "./use-garage-form";

export type CarInitial = Partial<Record<keyof typeof CAR_FIELDS, number | string | null>> & { weighedWithDriver?: boolean };

function stored(values: Record<string, string>, key: string, spec: NumberFieldSpec, system: UnitSystem): number | null {
  const typed = parseTypedNumber(values[key]);
  return typed === undefined || typed === NOT_A_NUMBER ? null : toStored(typed, spec.quantity, system);
}

export function CarForm({ draftKey, initial, initialSystem, serverErrors, formError, submitLabel }: {
  draftKey: string;
  initial: CarInitial;
  initialSystem: UnitSystem;
  serverErrors?: Record<string, string>;
  formError?: string;
  submitLabel: string;
}) {
  const form = useGarageForm({ draftKey, schema: carFormSchema, initialSystem, serverErrors });
  const { system, errors } = form;
  const num = (key: keyof typeof CAR_FIELDS) => {
    const spec = CAR_FIELDS[key] as NumberFieldSpec;
    return (
      <NumberInput
        name={key}
        spec={spec}
        system={system}
        defaultValue={formatForInput(initial[key] as number | null | undefined, spec.quantity, initialSystem)}
        error={errors[key]}
      />
    );
  };
  const corners = (["cornerFlKg", "cornerFrKg", "cornerRlKg", "cornerRrKg"] as const).map((k) => stored(form.values, k, CAR_FIELDS[k], system));
  const wheelbase = stored(form.values, "wheelbaseMm", CAR_FIELDS.wheelbaseMm, system);
  const summary = corners.every((c) => c !== null && c > 0)
    ? summariseCornerWeights({ fl: corners[0]!, fr: corners[1]!, rl: corners[2]!, rr: corners[3]! }, wheelbase)
    : null;

  return (
    <Form method="post" ref={form.formRef} onInput={form.onInput} onBlur={form.onBlur} onSubmit={form.onSubmit} noValidate>
      <DraftNotice savedAt={form.draftSavedAt} onDiscard={form.discardDraft} />
      <FormAlert>{formError}</FormAlert>
      <div className="mb-4">
        <UnitSwitch system={system} onChange={form.setSystem} />
      </div>
      <div className="grid gap-x-6 md:grid-cols-2">
        <section>
          <h2 className="mb-2 font-semibold">Car</h2>
          <TextInput name="name" spec={CAR_FIELDS.name} defaultValue={initial.name as string} error={errors.name} />
          <TextInput name="category" spec={CAR_FIELDS.category} defaultValue={initial.category as string} error={errors.category} />
          {num("wheelbaseMm")}
          <div className="grid grid-cols-2 gap-x-3">
            {num("trackFrontMm")}
            {num("trackRearMm")}
          </div>
          {num("cogHeightMm")}
          {num("steeringRatio")}
          {num("tyreVerticalStiffnessNPerMm")}
          {num("fuelTankFromFrontAxleMm")}
          {num("fuelDensityKgPerL")}
        </section>
        <section>
          <h2 className="mb-1 font-semibold">Corner weights</h2>
          <p className="mb-2 text-xs text-ink-soft">From the scales, on a level pad. State the driver and fuel so the mass means something later.</p>
          <div className="grid grid-cols-2 gap-x-3">
            {num("cornerFlKg")}
            {num("cornerFrKg")}
            {num("cornerRlKg")}
            {num("cornerRrKg")}
          </div>
          <label className="mb-3 flex items-center gap-2 text-sm">
            <input type="checkbox" name="weighedWithDriver" defaultChecked={initial.weighedWithDriver ?? false} />
            Driver in the car on the scales
          </label>
          {num("weighedFuelL")}
          <CornerSummary summary={summary} />
          {num("massKg")}
          {num("staticFrontWeightPct")}
        </section>
      </div>
      <TextInput name="notes" spec={CAR_FIELDS.notes} defaultValue={initial.notes as string} error={errors.notes} multiline />
      <Button>{submitLabel}</Button>
    </Form>
  );
}

function CornerSummary({ summary }: { summary: ReturnType<typeof summariseCornerWeights> | null }) {
  if (!summary)
    return <p className="mb-3 text-xs text-ink-faint">Enter all four corners to see total mass, static front %, cross weight and CoG position.</p>;
  const rows: [string, string][] = [
    ["Total mass", `${summary.totalKg.toFixed(1)} kg`],
    ["Static front", `${summary.staticFrontPct.toFixed(2)} %`],
    ["Cross weight (FR + RL)", `${summary.crossPct.toFixed(2)} %`],
    ["Left side", `${summary.leftPct.toFixed(2)} %`],
    ["CoG behind front axle", summary.cogFromFrontAxleMm === null ? "needs wheelbase" : `${summary.cogFromFrontAxleMm.toFixed(0)} mm`],
  ];
  return (
    <FigureList live rows={rows} className="mb-3 grid grid-cols-[1fr_auto] gap-x-4 rounded border border-rule-soft bg-paper px-3 py-2 text-sm" />
  );
}

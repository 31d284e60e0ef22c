import { Form } from "react-router";
import { SETUP_FIELDS, type NumberFieldSpec, type SetupFieldKey } from "~/lib/garage/fields";
import { setupFormSchema, type BumpStopKind } from "~/lib/garage/schemas";
import { formatBumpStopTable, type BumpStopPoint } from "~/lib/garage/bump-stop";
import { NOT_A_NUMBER, formatForInput, fromStored, parseTypedNumber, toStored, unitLabel, type UnitSystem } from "~/lib/garage/units";
import { Button, FormAlert } from "~/components/ui/form";
import { DraftNotice, NumberInput, TextInput, UnitSwitch } from "./inputs";
import { useGarageForm } from "./use-garage-form";

export type SetupInitial = Partial<Record<SetupFieldKey, number | string | null>> & {
  frontBumpStopKind?: BumpStopKind;
  rearBumpStopKind?: BumpStopKind;
  frontBumpStopTable?: BumpStopPoint[] | null;
  rearBumpStopTable?: BumpStopPoint[] | null;
};

export function SetupForm({ draftKey, initial, initialSystem, serverErrors, formError, mode, used }: {
  draftKey: string;
  initial: SetupInitial;
  initialSystem: UnitSystem;
  serverErrors?: Record<string, string>;
  formError?: string;
  mode: "new" | "edit";
  /** Sessions that use the version being edited: saving then always makes a new version. */
  used?: number;
}) {
  const form = useGarageForm({ draftKey, schema: setupFormSchema, initialSystem, serverErrors });
  const { system, errors, values } = form;
  const num = (key: SetupFieldKey, className?: string) => {
    const spec = SETUP_FIELDS[key] as NumberFieldSpec;
    return (
      <NumberInput
        name={key}
        spec={spec}
        system={system}
        className={className}
        defaultValue={formatForInput(initial[key] as number | null | undefined, spec.quantity, initialSystem)}
        error={errors[key]}
      />
    );
  };
  const text = (key: SetupFieldKey, multiline = false) => (
    <TextInput name={key} spec={SETUP_FIELDS[key] as never} defaultValue={initial[key] as string} error={errors[key]} multiline={multiline} />
  );

  const axle = (a: "front" | "rear") => {
    const kind = (values[`${a}BumpStopKind`] ?? initial[`${a}BumpStopKind`] ?? "none") as BumpStopKind;
    const spring = parseTypedNumber(values[`${a}SpringRateNPerMm`]);
    const mr = parseTypedNumber(values[`${a}MotionRatio`]);
    const wheelRate =
      typeof spring === "number" && typeof mr === "number" ? toStored(spring, "springRate", system) * mr * mr : null;
    const colour = a === "front" ? "border-front" : "border-rear";
    return (
      <section className={`mb-4 border-l-4 pl-3 ${colour}`}>
        <h2 className="mb-2 font-semibold">{a === "front" ? "Front axle" : "Rear axle"}</h2>
        {num(`${a}SpringRateNPerMm`)}
        {num(`${a}MotionRatio`)}
        <p className="mb-3 text-xs text-ink-soft" aria-live="polite">
          Wheel rate = spring rate × MR²:{" "}
          <span className="num">
            {wheelRate === null || spring === NOT_A_NUMBER ? "—" : `${fromStored(wheelRate, "springRate", system).toFixed(1)} ${unitLabel("springRate", system)}`}
          </span>
        </p>
        <div className="mb-3">
          <label htmlFor={`f-${a}BumpStopKind`} className="mb-1 block text-sm font-medium">
            Bump stop / packer
          </label>
          <select
            id={`f-${a}BumpStopKind`}
            name={`${a}BumpStopKind`}
            defaultValue={initial[`${a}BumpStopKind`] ?? "none"}
            className="block w-full rounded border border-rule bg-panel px-2.5 py-1.5"
          >
            <option value="none">None / not in contact range</option>
            <option value="linear">Gap and rate at the damper</option>
            <option value="table">Gap and force/deflection table</option>
          </select>
        </div>
        {kind !== "none" && num(`${a}BumpStopGapMm`)}
        {kind === "linear" && num(`${a}BumpStopRateNPerMm`)}
        {kind === "table" && (
          <div className="mb-3">
            <label htmlFor={`f-${a}BumpStopTable`} className="mb-1 block text-sm font-medium">
              Force/deflection table ({system === "metric" ? "mm, N" : "in, lbf"}, from contact, at the damper)
            </label>
            <textarea
              id={`f-${a}BumpStopTable`}
              name={`${a}BumpStopTable`}
              rows={4}
              defaultValue={formatBumpStopTable(initial[`${a}BumpStopTable`] ?? null, initialSystem)}
              className={`num block w-full rounded border bg-panel px-2.5 py-1.5 ${errors[`${a}BumpStopTable`] ? "border-danger" : "border-rule"}`}
            />
            <p className={`mt-1 text-xs ${errors[`${a}BumpStopTable`] ? "text-danger" : "text-ink-faint"}`} role={errors[`${a}BumpStopTable`] ? "alert" : undefined}>
              {errors[`${a}BumpStopTable`] ?? "One row per line: deflection from contact, then force, both at the damper. The analysis reads the table as given."}
            </p>
          </div>
        )}
      </section>
    );
  };

  return (
    <Form method="post" ref={form.formRef} onInput={form.onInput} onBlur={form.onBlur} onSubmit={form.onSubmit} noValidate>
      <DraftNotice savedAt={form.draftSavedAt} onDiscard={form.discardDraft} />
      <FormAlert>{formError}</FormAlert>
      {mode === "edit" && (
        <FormAlert tone="info">
          Saving writes the next version of this setup; the version you are editing stays as it is in the history
          {used ? ` (${used} session${used > 1 ? "s" : ""} used it)` : ""}.
        </FormAlert>
      )}
      <div className="mb-4">
        <UnitSwitch system={system} onChange={form.setSystem} />
      </div>
      {text("name")}
      <p className="mb-3 text-xs text-ink-soft">
        Conventions: spring and bump-stop rates are at the damper; motion ratio MR = damper travel / wheel travel; the
        bump-stop gap is damper travel from the static position to contact.
      </p>
      <div className="grid gap-x-6 md:grid-cols-2">
        {axle("front")}
        {axle("rear")}
      </div>
      <section className="mb-4">
        <h2 className="mb-2 font-semibold">Static readings</h2>
        <p className="mb-2 text-xs text-ink-soft">Damper pots with the car at rest at start-of-session weight. Leave empty to let the engine estimate them.</p>
        <div className="grid grid-cols-2 gap-x-3 md:grid-cols-4">
          {num("staticDamperFlMm")}
          {num("staticDamperFrMm")}
          {num("staticDamperRlMm")}
          {num("staticDamperRrMm")}
        </div>
        <div className="grid grid-cols-2 gap-x-3">
          {num("rideHeightFrontMm")}
          {num("rideHeightRearMm")}
        </div>
      </section>
      <section className="mb-4 grid gap-x-6 md:grid-cols-2">
        <div>
          <h2 className="mb-2 font-semibold">Anti-roll bars</h2>
          {text("arbFront")}
          {text("arbRear")}
        </div>
        <div>
          <h2 className="mb-2 font-semibold">Aero</h2>
          {num("rearWingAngleDeg")}
          {text("rearWingStep")}
          {text("frontAero")}
          {text("aeroNotes", true)}
        </div>
      </section>
      {text("notes", true)}
      {text("changeNote")}
      <div className="flex gap-3">
        <Button name="intent" value="save">
          {mode === "new" ? "Create setup" : "Save as new version"}
        </Button>
      </div>
    </Form>
  );
}

/**
 * Session details step: car and setup version from the Garage, date, venue, run label, driver,
 * weather, fuel and notes. Validated in the browser with the same zod schema the server applies
 * (app/lib/sessions/details.ts), each message beside its field.
 */
import type { ReactNode, SelectHTMLAttributes, InputHTMLAttributes, TextareaHTMLAttributes } from "react";
import type { DropChoices } from "~/routes/sessions/drop-page.server";
import type { DetailsDraft } from "./types";

export const OTHER = "__other";

/** The draft in the details schema's input shape (strings; blanks are "not given"). */
export function detailsInput(d: DetailsDraft, venueOther: boolean, driverOther: boolean) {
  return {
    carId: d.carId,
    setupId: d.setupId,
    date: d.date,
    venueId: venueOther ? "" : d.venueId,
    venueName: venueOther ? d.venueName : "",
    run: d.run,
    driverUserId: driverOther ? "" : d.driverUserId,
    driverName: driverOther ? d.driverName : "",
    air: { temp_c: d.airTempC, pressure_hpa: d.airPressureHpa, humidity_pct: d.airHumidityPct },
    fuel_l: { start: d.fuelStartL, end: d.fuelEndL },
    fuelDensityKgPerL: d.fuelDensityKgPerL,
    tyreNotes: d.tyreNotes,
    notes: d.notes,
  };
}

const inputLook = (error?: string) => `block w-full rounded border bg-panel px-3 py-2 text-ink outline-none focus:border-accent focus:ring-2 focus:ring-accent/25 ${error ? "border-danger" : "border-rule"}`;

function Wrap({ id, label, error, hint, children, className }: { id: string; label: ReactNode; error?: string; hint?: ReactNode; children: ReactNode; className?: string }) {
  return (
    <div className={className}>
      <label htmlFor={id} className="mb-1 block text-sm font-medium">{label}</label>
      {children}
      {error ? <p id={`${id}-msg`} role="alert" className="mt-1 text-sm text-danger">{error}</p> : hint ? <p id={`${id}-msg`} className="mt-1 text-xs text-ink-faint">{hint}</p> : null}
    </div>
  );
}

type Common = { name: string; label: ReactNode; error?: string; hint?: ReactNode; className?: string };

function Input({ name, label, error, hint, className, ...rest }: Common & InputHTMLAttributes<HTMLInputElement>) {
  const id = `f-${name}`;
  return (
    <Wrap id={id} label={label} error={error} hint={hint} className={className}>
      <input id={id} name={name} aria-invalid={error ? true : undefined} aria-describedby={error || hint ? `${id}-msg` : undefined} className={inputLook(error)} {...rest} />
    </Wrap>
  );
}

function Select({ name, label, error, hint, className, children, ...rest }: Common & SelectHTMLAttributes<HTMLSelectElement>) {
  const id = `f-${name}`;
  return (
    <Wrap id={id} label={label} error={error} hint={hint} className={className}>
      <select id={id} name={name} aria-invalid={error ? true : undefined} className={inputLook(error)} {...rest}>{children}</select>
    </Wrap>
  );
}

function Area({ name, label, error, className, ...rest }: Common & TextareaHTMLAttributes<HTMLTextAreaElement>) {
  const id = `f-${name}`;
  return (
    <Wrap id={id} label={label} error={error} className={className}>
      <textarea id={id} name={name} rows={2} aria-invalid={error ? true : undefined} className={inputLook(error)} {...rest} />
    </Wrap>
  );
}

interface Props {
  choices: DropChoices;
  draft: DetailsDraft;
  venueOther: boolean;
  driverOther: boolean;
  errors: Record<string, string>;
  busy: boolean;
  onChange(patch: Partial<DetailsDraft>, flags?: { venueOther?: boolean; driverOther?: boolean }): void;
  onBack(): void;
  onSubmit(): void;
  garageLink: string;
}

export function DetailsStep({ choices, draft, venueOther, driverOther, errors, busy, onChange, onBack, onSubmit, garageLink }: Props) {
  const car = choices.cars.find((c) => c.id === draft.carId);
  const venue = choices.venues.find((v) => v.id === draft.venueId);
  const set = (key: keyof DetailsDraft) => (e: { target: { value: string } }) => onChange({ [key]: e.target.value });
  const airHint = venue && !venueOther && venue.altitudeM !== null
    ? `Leave blank to use ISA air at ${venue.name}'s altitude (${Math.round(venue.altitudeM)} m).`
    : "Leave blank to use ISA air at sea level (15 °C, 1013.25 hPa).";
  return (
    <form
      noValidate
      className="space-y-5"
      onSubmit={(e) => {
        e.preventDefault();
        onSubmit();
      }}
    >
      {errors.form && <p role="alert" className="rounded border border-danger/40 bg-danger-bg px-3 py-2 text-sm text-danger">{errors.form}</p>}
      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-sm font-semibold text-ink-soft">Car and setup</legend>
        <Select name="carId" label="Car" error={errors.carId} value={draft.carId} onChange={(e) => onChange({ carId: e.target.value, setupId: choices.cars.find((c) => c.id === e.target.value)?.setups[0]?.id ?? "" })}
          hint={choices.cars.length === 0 ? <>No cars yet: <a className="text-accent underline" href={garageLink}>add one in the Garage</a>.</> : undefined}>
          <option value="">Choose a car…</option>
          {choices.cars.map((c) => <option key={c.id} value={c.id}>{c.name}</option>)}
        </Select>
        <Select name="setupId" label="Setup version" error={errors.setupId} value={draft.setupId} onChange={set("setupId")} disabled={!car}
          hint={car && car.setups.length === 0 ? "This car has no setup sheet yet: add one in the Garage." : undefined}>
          <option value="">{car ? "Choose a setup version…" : "Choose a car first"}</option>
          {car?.setups.map((s) => <option key={s.id} value={s.id}>{s.label}</option>)}
        </Select>
      </fieldset>
      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-sm font-semibold text-ink-soft">Stint</legend>
        <Input name="date" label="Date" type="date" error={errors.date} value={draft.date} onChange={set("date")} />
        <Select name="venueId" label="Venue" error={errors.venueId} value={venueOther ? OTHER : draft.venueId} onChange={(e) => e.target.value === OTHER ? onChange({ venueId: "" }, { venueOther: true }) : onChange({ venueId: e.target.value }, { venueOther: false })}>
          <option value="">Choose a venue…</option>
          {choices.venues.map((v) => <option key={v.id} value={v.id}>{v.name}</option>)}
          <option value={OTHER}>Another venue…</option>
        </Select>
        {venueOther && <Input name="venueName" label="Venue name" error={errors.venueName} value={draft.venueName} onChange={set("venueName")} maxLength={80} />}
        <Input name="run" label="Run label" error={errors.run} value={draft.run} onChange={set("run")} maxLength={80} placeholder="e.g. Practice 2, run 3" />
        <Select name="driverUserId" label="Driver" error={errors.driverUserId} value={driverOther ? OTHER : draft.driverUserId} onChange={(e) => e.target.value === OTHER ? onChange({ driverUserId: "" }, { driverOther: true }) : onChange({ driverUserId: e.target.value }, { driverOther: false })}>
          <option value="">Not said</option>
          {choices.members.map((m) => <option key={m.userId} value={m.userId}>{m.name}</option>)}
          <option value={OTHER}>Someone else…</option>
        </Select>
        {driverOther && <Input name="driverName" label="Driver's name" error={errors.driverName} value={draft.driverName} onChange={set("driverName")} maxLength={120} />}
      </fieldset>
      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-1 text-sm font-semibold text-ink-soft">Weather</legend>
        <p className="text-xs text-ink-faint sm:col-span-3">{airHint} Air density sets every ClA.</p>
        <Input name="air.temp_c" label="Air temperature (°C)" inputMode="decimal" error={errors["air.temp_c"]} value={draft.airTempC} onChange={set("airTempC")} />
        <Input name="air.pressure_hpa" label="Air pressure (hPa)" inputMode="decimal" error={errors["air.pressure_hpa"]} value={draft.airPressureHpa} onChange={set("airPressureHpa")} hint="Station pressure, not sea-level QNH." />
        <Input name="air.humidity_pct" label="Humidity (%)" inputMode="decimal" error={errors["air.humidity_pct"] ?? errors.air} value={draft.airHumidityPct} onChange={set("airHumidityPct")} hint="Optional; dry air without it." />
      </fieldset>
      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-1 text-sm font-semibold text-ink-soft">Fuel</legend>
        <p className="text-xs text-ink-faint sm:col-span-3">With both, the burn is a known input; without them the change of static load is fitted as a trend.</p>
        <Input name="fuel_l.start" label="Fuel at the start (L)" inputMode="decimal" error={errors["fuel_l.start"] ?? errors.fuel_l} value={draft.fuelStartL} onChange={set("fuelStartL")} />
        <Input name="fuel_l.end" label="Fuel at the end (L)" inputMode="decimal" error={errors["fuel_l.end"]} value={draft.fuelEndL} onChange={set("fuelEndL")} />
        <Input name="fuelDensityKgPerL" label="Fuel density (kg/L)" inputMode="decimal" error={errors.fuelDensityKgPerL} value={draft.fuelDensityKgPerL} onChange={set("fuelDensityKgPerL")} placeholder={car?.fuelDensityKgPerL != null ? String(car.fuelDensityKgPerL) : "0.745"} hint="Blank: the car's figure from the Garage." />
      </fieldset>
      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-sm font-semibold text-ink-soft">Notes</legend>
        <Area name="tyreNotes" label="Tyre notes" error={errors.tyreNotes} value={draft.tyreNotes} onChange={set("tyreNotes")} maxLength={2000} />
        <Area name="notes" label="Notes" error={errors.notes} value={draft.notes} onChange={set("notes")} maxLength={2000} />
      </fieldset>
      <div className="flex flex-wrap gap-3">
        <button type="button" onClick={onBack} className="rounded border border-rule bg-panel px-3 py-2 text-sm font-medium hover:bg-rule-soft">Back to the Channel map</button>
        <button type="submit" disabled={busy} className="rounded border border-accent bg-accent px-3 py-2 text-sm font-medium text-white hover:bg-accent-strong disabled:opacity-60">
          {busy ? "Reading…" : "Read and store the session"}
        </button>
      </div>
    </form>
  );
}

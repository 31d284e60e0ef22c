/**
 * Session details: what the engineer says about a stint beside the log (car and setup version, date,
 * venue, run label, driver, weather, fuel, notes). One zod schema for the Drop a log form in the
 * browser and for the server (page upload, headless API, seed), with a message per field.
 *
 * Input may come from a form (strings, "" for an empty field) or from JSON (numbers); output is
 * trimmed, NFC-normalised text and numbers in the units named by the keys. Field keys of messages
 * are dotted paths ("air.temp_c", "fuel_l.end"); `detailsFieldErrors` gives them flat.
 */
import { z } from "zod";
import { isaAtGeopotentialM } from "~/engine/density";
import { DEFAULT_PETROL_DENSITY_KG_PER_L, fuelMassKg } from "~/engine/fuel";
import type { SummaryOptions } from "~/engine/summary-options";

/** Plausible ranges, wide enough for any circuit or hill-climb day (common practice). */
export const DETAIL_LIMITS = {
  airTempC: { min: -30, max: 55 },
  // Sea-level pressure is 1013.25 hPa (ISA, ISO 2533:1975); 500 hPa is about 5.5 km up.
  airPressureHpa: { min: 500, max: 1100 },
  humidityPct: { min: 0, max: 100 },
  fuelL: { min: 0, max: 300 },
  // Petrol is about 0.72–0.78 kg/L, diesel about 0.83–0.85, ethanol 0.79 (common practice).
  fuelDensityKgPerL: { min: 0.6, max: 1.0 },
  textMax: 2000,
  runMax: 80,
  nameMax: 120,
  venueNameMax: 80,
} as const;

/** Blank strings and nulls are left out, and so is a group whose members are all blank (an untouched part of the form). */
function withoutBlanks(raw: unknown): unknown {
  if (raw === null || (typeof raw === "string" && raw.trim() === "")) return undefined;
  if (typeof raw !== "object" || Array.isArray(raw)) return raw;
  const out: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(raw)) {
    const kept = withoutBlanks(value);
    if (kept !== undefined) out[key] = kept;
  }
  return Object.keys(out).length ? out : undefined;
}

/** A number typed in a form ("12,5" reads as 12.5) or given in JSON. */
function numberIn(label: string, { min, max }: { min: number; max: number }, unit: string) {
  return z.preprocess(
    (raw) => {
      if (typeof raw !== "string") return raw;
      const n = Number(raw.trim().replace(",", "."));
      return Number.isFinite(n) ? n : raw;
    },
    z
      .number({ error: (issue) => (issue.input === undefined ? `${label} is required.` : `${label}: "${String(issue.input)}" is not a number.`) })
      .refine((n) => Number.isFinite(n), `${label} must be a finite number.`)
      .refine((n) => n >= min && n <= max, `${label} must be between ${min} and ${max} ${unit}.`),
  );
}

function text(label: string, max: number) {
  return z
    .string({ error: `${label} must be text.` })
    .transform((s) => s.normalize("NFC").trim())
    .refine((s) => s.length <= max, { message: `${label} is too long; keep it to ${max} characters.` })
    .optional();
}

const id = (message: string) => z.string({ error: message }).trim().min(1, message).max(36, message);
const optionalId = z.string().trim().max(36, "That id is too long.").optional();

const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

/** A calendar date, YYYY-MM-DD, that exists (2026-02-30 does not). */
export function isCalendarDate(value: string): boolean {
  const m = ISO_DATE.exec(value);
  if (!m) return false;
  const d = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])));
  return d.getUTCFullYear() === Number(m[1]) && d.getUTCMonth() === Number(m[2]) - 1 && d.getUTCDate() === Number(m[3]);
}

const dateField = z
  .string({ error: "Date is required." })
  .trim()
  .refine((s) => ISO_DATE.test(s), "Date must be written YYYY-MM-DD.")
  .refine((s) => !ISO_DATE.test(s) || isCalendarDate(s), "Date is not a day of the calendar.")
  .refine((s) => !isCalendarDate(s) || (s >= "1990-01-01" && s <= "2100-12-31"), "Date must be between 1990 and 2100.");

const airSchema = z.object(
  {
    temp_c: numberIn("Air temperature", DETAIL_LIMITS.airTempC, "°C"),
    pressure_hpa: numberIn("Air pressure", DETAIL_LIMITS.airPressureHpa, "hPa"),
    humidity_pct: numberIn("Humidity", DETAIL_LIMITS.humidityPct, "%").optional(),
  },
  { error: "Air must give temp_c and pressure_hpa." },
);

const fuelSchema = z
  .object(
    {
      start: numberIn("Fuel at the start", DETAIL_LIMITS.fuelL, "L"),
      end: numberIn("Fuel at the end", DETAIL_LIMITS.fuelL, "L"),
    },
    { error: "Fuel must give start and end in litres." },
  )
  .refine((f) => f.end <= f.start, { message: "Fuel at the end must not be more than at the start.", path: ["end"] });

function detailsShape(required: { date: boolean; venue: boolean }) {
  const shape = z
    .object(
      {
        carId: id("Choose a car."),
        setupId: id("Choose a setup version."),
        date: required.date ? dateField : dateField.optional(),
        venueId: optionalId,
        venueName: text("Venue", DETAIL_LIMITS.venueNameMax),
        run: text("Run label", DETAIL_LIMITS.runMax),
        driverUserId: optionalId,
        driverName: text("Driver", DETAIL_LIMITS.nameMax),
        air: airSchema.optional(),
        fuel_l: fuelSchema.optional(),
        fuelDensityKgPerL: numberIn("Fuel density", DETAIL_LIMITS.fuelDensityKgPerL, "kg/L").optional(),
        tyreNotes: text("Tyre notes", DETAIL_LIMITS.textMax),
        notes: text("Notes", DETAIL_LIMITS.textMax),
      },
      { error: "Session details must be an object of fields." },
    )
    // `when`: these run even while other fields have problems, so the form shows every message at once.
    .superRefine(
      (d, ctx) => {
        if (required.venue && !d.venueId && !d.venueName) ctx.addIssue({ code: "custom", path: ["venueId"], message: "Choose a venue or type its name." });
        if (d.venueId && d.venueName) ctx.addIssue({ code: "custom", path: ["venueName"], message: "Choose a venue from the list or type a new one, not both." });
        if (d.driverUserId && d.driverName) ctx.addIssue({ code: "custom", path: ["driverName"], message: "Choose a team member or type a driver's name, not both." });
      },
      { when: () => true } as never,
    );
  return z.preprocess((raw) => withoutBlanks(raw) ?? {}, shape);
}

/** The Drop a log form: car, setup version, date and venue are required. */
export const sessionDetailsSchema = detailsShape({ date: true, venue: true });

/** The headless API and the seed: date and venue may be left out (the API's meta makes them optional). */
export const looseSessionDetailsSchema = detailsShape({ date: false, venue: false });

export type SessionDetailsInput = z.input<typeof sessionDetailsSchema>;
export type SessionDetails = z.output<typeof looseSessionDetailsSchema>;

/** One message per field, keyed by its dotted path ("air.temp_c"); problems of the whole object under "form". */
export function detailsFieldErrors(error: z.ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.map(String).join(".") : "form";
    out[key] ??= issue.message;
  }
  return out;
}

/** The engine's fuel input in kg from litres (density given, else the car's, else the engine's petrol default). */
export function fuelKgOf(details: Pick<SessionDetails, "fuel_l" | "fuelDensityKgPerL">, carDensityKgPerL?: number | null): { startKg: number; endKg: number } | undefined {
  if (!details.fuel_l) return undefined;
  const density = details.fuelDensityKgPerL ?? carDensityKgPerL ?? DEFAULT_PETROL_DENSITY_KG_PER_L;
  return { startKg: fuelMassKg(details.fuel_l.start, density), endKg: fuelMassKg(details.fuel_l.end, density) };
}

/**
 * The engine's options from the session details, the same in the browser and in the server's re-check:
 * weather as typed, else ISA at the venue's altitude (ISO 2533:1975, app/engine/density.ts), else the
 * engine's ISA sea level; fuel in litres → kg with the details' density, else the car's.
 */
export function engineOptionsOf(
  details: Pick<SessionDetails, "air" | "fuel_l" | "fuelDensityKgPerL">,
  ctx: { venueAltitudeM: number | null; carFuelDensityKgPerL: number | null },
): SummaryOptions {
  const options: SummaryOptions = {};
  if (details.air) {
    options.airTempC = details.air.temp_c;
    options.airPressureHpa = details.air.pressure_hpa;
    if (details.air.humidity_pct !== undefined) options.airHumidityPct = details.air.humidity_pct;
  } else if (ctx.venueAltitudeM !== null) {
    const isa = isaAtGeopotentialM(ctx.venueAltitudeM);
    options.airTempC = isa.temp_k - 273.15;
    options.airPressureHpa = isa.pressure_pa / 100;
  }
  const fuel = fuelKgOf(details, ctx.carFuelDensityKgPerL);
  if (fuel) options.fuel = fuel;
  return options;
}

/** Where the air density came from, as stored with the session. */
export function airSourceOf(details: Pick<SessionDetails, "air">, venueAltitudeM: number | null): "given" | "venue_altitude" | "isa_sea_level" {
  return details.air ? "given" : venueAltitudeM !== null ? "venue_altitude" : "isa_sea_level";
}

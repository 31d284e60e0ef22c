/**
 * One zod schema per form, used by the server action and by the browser for field-level messages.
 * Input is what a form posts (strings in the chosen unit system); output is in stored units
 * (mm, kg, N/mm, L, deg), empty optional fields as null.
 */
import { z } from "zod";
import { CAR_FIELDS, SETUP_FIELDS, describeValue, rangeProblem, type NumberFieldSpec, type TextFieldSpec } from "./fields";
import { summariseCornerWeights } from "./corner-weights";
import { NOT_A_NUMBER, StoredValue, isUnitSystem, parseTypedNumber, toStored, type UnitSystem } from "./units";
import { bumpStopTableProblem, linearRateFromTable, parseBumpStopTable, type BumpStopPoint } from "./bump-stop";

/**
 * A form field: a missing key counts as an empty field (zod 4 otherwise reports absent keys of
 * transform schemas as "nonoptional" before our own message can say what is missing).
 */
function present<T>(transform: (raw: unknown, ctx: z.RefinementCtx) => T) {
  return z.preprocess((raw) => (raw === undefined ? "" : raw), z.unknown().transform(transform));
}

function numberField(spec: NumberFieldSpec & { required: true }, system: UnitSystem): z.ZodType<number, unknown>;
function numberField(spec: NumberFieldSpec, system: UnitSystem): z.ZodType<number | null, unknown>;
function numberField(spec: NumberFieldSpec, system: UnitSystem): z.ZodType<any, unknown> {
  return present((raw, ctx) => {
    if (raw instanceof StoredValue) {
      const problem = rangeProblem(spec, raw.value, system);
      if (problem) ctx.addIssue({ code: "custom", message: problem });
      return problem ? z.NEVER : raw.value;
    }
    const typed = parseTypedNumber(raw);
    if (typed === NOT_A_NUMBER) {
      ctx.addIssue({ code: "custom", message: `${spec.label}: "${String(raw)}" is not a number.` });
      return z.NEVER;
    }
    if (typed === undefined) {
      if (spec.required) ctx.addIssue({ code: "custom", message: `${spec.label} is required.` });
      return spec.required ? z.NEVER : null;
    }
    const stored = toStored(typed, spec.quantity, system);
    const problem = rangeProblem(spec, stored, system);
    if (problem) {
      ctx.addIssue({ code: "custom", message: problem });
      return z.NEVER;
    }
    return stored;
  });
}

function textField(spec: TextFieldSpec & { required: true }): z.ZodType<string, unknown>;
function textField(spec: TextFieldSpec): z.ZodType<string | null, unknown>;
function textField(spec: TextFieldSpec): z.ZodType<any, unknown> {
  return present((raw, ctx) => {
    const value = typeof raw === "string" ? raw.trim() : raw === undefined || raw === null ? "" : String(raw);
    if (value === "") {
      if (spec.required) ctx.addIssue({ code: "custom", message: `${spec.label} is required.` });
      return spec.required ? z.NEVER : null;
    }
    if (value.length > spec.maxLength) {
      ctx.addIssue({ code: "custom", message: `${spec.label} is ${value.length} characters; keep it to ${spec.maxLength}.` });
      return z.NEVER;
    }
    return value;
  });
}

const checkbox = present((raw) => raw === true || raw === "on" || raw === "true" || raw === "yes");

export const unitSystemSchema = present((raw): UnitSystem => (isUnitSystem(raw) ? raw : "metric"));

/** Largest disagreement between the stated mass and the corner-weight sum: max(2 kg, 0.5 %). */
export function massTolerance(statedKg: number): number {
  return Math.max(2, statedKg * 0.005);
}
/** Largest disagreement between the stated and the computed front %, in percentage points. */
export const FRONT_PCT_TOLERANCE = 0.5;

export function carFormSchema(system: UnitSystem) {
  const f = CAR_FIELDS;
  return z
    .object({
      name: textField(f.name),
      category: textField(f.category),
      wheelbaseMm: numberField(f.wheelbaseMm, system),
      trackFrontMm: numberField(f.trackFrontMm, system),
      trackRearMm: numberField(f.trackRearMm, system),
      cogHeightMm: numberField(f.cogHeightMm, system),
      steeringRatio: numberField(f.steeringRatio, system),
      tyreVerticalStiffnessNPerMm: numberField(f.tyreVerticalStiffnessNPerMm, system),
      fuelTankFromFrontAxleMm: numberField(f.fuelTankFromFrontAxleMm, system),
      fuelDensityKgPerL: numberField(f.fuelDensityKgPerL, system),
      cornerFlKg: numberField(f.cornerFlKg, system),
      cornerFrKg: numberField(f.cornerFrKg, system),
      cornerRlKg: numberField(f.cornerRlKg, system),
      cornerRrKg: numberField(f.cornerRrKg, system),
      weighedWithDriver: checkbox,
      weighedFuelL: numberField(f.weighedFuelL, system),
      massKg: numberField(f.massKg, system),
      staticFrontWeightPct: numberField(f.staticFrontWeightPct, system),
      notes: textField(f.notes),
    })
    .superRefine((car, ctx) => {
      const corners = [car.cornerFlKg, car.cornerFrKg, car.cornerRlKg, car.cornerRrKg];
      const keys = ["cornerFlKg", "cornerFrKg", "cornerRlKg", "cornerRrKg"] as const;
      const given = corners.filter((c) => c !== null).length;
      if (given > 0 && given < 4) {
        keys.forEach((key, i) => {
          if (corners[i] === null)
            ctx.addIssue({ code: "custom", path: [key], message: "Enter all four corner weights, or none (then give the total mass and front %)." });
        });
        return;
      }
      if (given === 0) {
        if (car.massKg === null)
          ctx.addIssue({ code: "custom", path: ["massKg"], message: "Without corner weights, the total mass is required." });
        if (car.staticFrontWeightPct === null)
          ctx.addIssue({ code: "custom", path: ["staticFrontWeightPct"], message: "Without corner weights, the static front weight % is required." });
        return;
      }
      const sum = summariseCornerWeights({ fl: car.cornerFlKg!, fr: car.cornerFrKg!, rl: car.cornerRlKg!, rr: car.cornerRrKg! });
      const massSpec = CAR_FIELDS.massKg;
      const sumProblem = rangeProblem({ ...massSpec, label: "The corner weights add up to" }, sum.totalKg, system);
      if (sumProblem) ctx.addIssue({ code: "custom", path: ["cornerFlKg"], message: sumProblem });
      if (car.massKg !== null && Math.abs(car.massKg - sum.totalKg) > massTolerance(car.massKg)) {
        ctx.addIssue({
          code: "custom",
          path: ["massKg"],
          message: `The corner weights add up to ${describeValue(sum.totalKg, "mass", system)} but the stated total mass is ${describeValue(car.massKg, "mass", system)}. Re-check the scale readings, or clear the total to use the sum.`,
        });
      }
      if (car.staticFrontWeightPct !== null && Math.abs(car.staticFrontWeightPct - sum.staticFrontPct) > FRONT_PCT_TOLERANCE) {
        ctx.addIssue({
          code: "custom",
          path: ["staticFrontWeightPct"],
          message: `The corner weights give ${sum.staticFrontPct.toFixed(1)} % front but ${car.staticFrontWeightPct} % is stated. Re-check the readings, or clear the stated value.`,
        });
      }
    });
}
export type CarFormValues = z.output<ReturnType<typeof carFormSchema>>;

export const BUMP_STOP_KINDS = ["none", "linear", "table"] as const;
export type BumpStopKind = (typeof BUMP_STOP_KINDS)[number];
const bumpKind = present((raw): BumpStopKind => (BUMP_STOP_KINDS.includes(raw as BumpStopKind) ? (raw as BumpStopKind) : "none"));

function bumpTable(system: UnitSystem) {
  return present((raw, ctx): BumpStopPoint[] | null => {
    if (typeof raw !== "string" || raw.trim() === "") return null;
    const parsed = parseBumpStopTable(raw, system);
    if (typeof parsed === "string") {
      ctx.addIssue({ code: "custom", message: parsed });
      return z.NEVER;
    }
    const problem = bumpStopTableProblem(parsed);
    if (problem) {
      ctx.addIssue({ code: "custom", message: problem });
      return z.NEVER;
    }
    return parsed;
  });
}

export function setupFormSchema(system: UnitSystem) {
  const f = SETUP_FIELDS;
  return z
    .object({
      name: textField(f.name),
      frontSpringRateNPerMm: numberField(f.frontSpringRateNPerMm, system),
      rearSpringRateNPerMm: numberField(f.rearSpringRateNPerMm, system),
      frontMotionRatio: numberField(f.frontMotionRatio, system),
      rearMotionRatio: numberField(f.rearMotionRatio, system),
      frontBumpStopKind: bumpKind,
      frontBumpStopGapMm: numberField(f.frontBumpStopGapMm, system),
      frontBumpStopRateNPerMm: numberField(f.frontBumpStopRateNPerMm, system),
      frontBumpStopTable: bumpTable(system),
      rearBumpStopKind: bumpKind,
      rearBumpStopGapMm: numberField(f.rearBumpStopGapMm, system),
      rearBumpStopRateNPerMm: numberField(f.rearBumpStopRateNPerMm, system),
      rearBumpStopTable: bumpTable(system),
      staticDamperFlMm: numberField(f.staticDamperFlMm, system),
      staticDamperFrMm: numberField(f.staticDamperFrMm, system),
      staticDamperRlMm: numberField(f.staticDamperRlMm, system),
      staticDamperRrMm: numberField(f.staticDamperRrMm, system),
      rideHeightFrontMm: numberField(f.rideHeightFrontMm, system),
      rideHeightRearMm: numberField(f.rideHeightRearMm, system),
      arbFront: textField(f.arbFront),
      arbRear: textField(f.arbRear),
      rearWingAngleDeg: numberField(f.rearWingAngleDeg, system),
      rearWingStep: textField(f.rearWingStep),
      frontAero: textField(f.frontAero),
      aeroNotes: textField(f.aeroNotes),
      notes: textField(f.notes),
      changeNote: textField(f.changeNote),
    })
    .superRefine((s, ctx) => {
      for (const axle of ["front", "rear"] as const) {
        const kind = s[`${axle}BumpStopKind`];
        const label = axle === "front" ? "Front" : "Rear";
        if (kind === "none") continue;
        if (s[`${axle}BumpStopGapMm`] === null)
          ctx.addIssue({ code: "custom", path: [`${axle}BumpStopGapMm`], message: `${label} bump stop: enter the gap from static to contact.` });
        if (kind === "linear" && s[`${axle}BumpStopRateNPerMm`] === null)
          ctx.addIssue({ code: "custom", path: [`${axle}BumpStopRateNPerMm`], message: `${label} bump stop: enter its rate at the damper, or choose "table".` });
        const table = s[`${axle}BumpStopTable`];
        if (kind === "table" && table) {
          const rate = linearRateFromTable(table);
          if (!(rate >= 1 && rate <= 20000))
            ctx.addIssue({ code: "custom", path: [`${axle}BumpStopTable`], message: `${label} bump-stop table fits a rate of ${rate.toFixed(0)} N/mm at the damper; expected 1–20000 N/mm. Check the units of the rows.` });
        }
        if (kind === "table" && table === null)
          ctx.addIssue({ code: "custom", path: [`${axle}BumpStopTable`], message: `${label} bump stop: enter the force/deflection table, one "deflection force" pair per line.` });
      }
      const dampers = ["staticDamperFlMm", "staticDamperFrMm", "staticDamperRlMm", "staticDamperRrMm"] as const;
      const given = dampers.filter((k) => s[k] !== null).length;
      if (given > 0 && given < 4) {
        for (const key of dampers)
          if (s[key] === null)
            ctx.addIssue({ code: "custom", path: [key], message: "Enter all four static damper readings, or none (the engine then estimates them)." });
      }
    });
}
export type SetupFormValues = z.output<ReturnType<typeof setupFormSchema>>;

/** Field messages keyed by field name, first message per field (for forms). */
export function fieldErrors(error: z.ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? String(issue.path[0]) : "_form";
    if (!(key in out)) out[key] = issue.message;
  }
  return out;
}

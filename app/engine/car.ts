/**
 * CAR.json validation (zod) and the derived figures the physics uses. This is the one schema for a
 * car file: the CLI, the worker API and the Garage import (app/lib/garage/car-json.ts wraps it)
 * accept exactly the same files.
 * Rates and bump-stop gaps are at the damper; the gap is measured from the static position.
 * Ranges are wide plausibility limits that catch typing errors (a motion ratio of 7, a mass in
 * pounds), not design limits (`CAR_LIMITS`).
 */
import { z } from "zod";
import { EngineError } from "./errors";
import type { CarInput } from "./types";

/** Plausibility limits of the car file's numbers: [lowest, highest, unit text]. */
export const CAR_LIMITS = {
  wheelbase_mm: [1200, 4500, "mm"],
  mass_kg: [150, 4000, "kg with driver"],
  static_front_weight_pct: [20, 80, "%"],
  cog_height_mm: [100, 1200, "mm"],
  steering_ratio: [4, 40, ": 1 (steering wheel / road wheel)"],
  fuel_tank_from_front_axle_mm: [-1000, 6000, "mm behind the front axle (centre of the tank)"],
  spring_rate_n_per_mm: [5, 2000, "N/mm at the damper"],
  motion_ratio: [0.3, 1.5, "(damper travel / wheel travel)"],
  bump_stop_gap_mm: [0, 150, "mm of damper travel from static"],
  bump_stop_rate_n_per_mm: [1, 20_000, "N/mm at the damper"],
  static_damper_mm: [-500, 500, "mm"],
  bump_table_deflection_mm: [0, 150, "mm from contact"],
  bump_table_force_n: [0, 200_000, "N at the damper"],
} as const satisfies Record<string, readonly [number, number, string]>;

const limit = (k: keyof typeof CAR_LIMITS) => ranged(CAR_LIMITS[k][0], CAR_LIMITS[k][1], CAR_LIMITS[k][2]);

function ranged(lo: number, hi: number, unit: string) {
  const what = `a number from ${lo} to ${hi}${unit ? " " + unit : ""}`;
  return z
    .number({ error: (iss) => (iss.input === undefined ? `is missing (${what})` : `must be ${what}, got ${JSON.stringify(iss.input)}`) })
    .refine((v) => Number.isFinite(v) && v >= lo && v <= hi, { error: (iss) => `must be ${what}, got ${String(iss.input)}` });
}

const tableRow = z.strictObject(
  { deflection_mm: limit("bump_table_deflection_mm"), force_n: limit("bump_table_force_n") },
  { error: "must be an object { deflection_mm, force_n }" },
);

/** A force/deflection table: 2–40 rows, deflection rising, force never falling (rubber stiffens as it compresses). */
const forceTable = z
  .array(tableRow, { error: "must be a list of { deflection_mm, force_n } rows" })
  .min(2, { error: "needs at least two rows" })
  .max(40, { error: "holds at most 40 rows" })
  .superRefine((rows, ctx) => {
    for (let i = 1; i < rows.length; i++) {
      if (!(rows[i].deflection_mm > rows[i - 1].deflection_mm)) ctx.addIssue({ code: "custom", path: [i, "deflection_mm"], message: `must be larger than the row before (${rows[i - 1].deflection_mm} mm)` });
      else if (rows[i].force_n < rows[i - 1].force_n) ctx.addIssue({ code: "custom", path: [i, "force_n"], message: `must not fall below the row before (${rows[i - 1].force_n} N)` });
    }
    if (rows.every((r) => r.force_n === 0)) ctx.addIssue({ code: "custom", message: "has zero force on every row, which is not a stop" });
  });

const bumpStopSchema = z.strictObject(
  {
    gap_mm: limit("bump_stop_gap_mm"),
    rate_n_per_mm: limit("bump_stop_rate_n_per_mm"),
    force_table: forceTable.optional(),
  },
  { error: "must be an object { gap_mm, rate_n_per_mm, force_table? }" },
);

const axleSchema = z.strictObject(
  {
    spring_rate_n_per_mm: limit("spring_rate_n_per_mm"),
    motion_ratio: limit("motion_ratio"),
    bump_stop: bumpStopSchema.optional(),
  },
  { error: (iss) => (iss.input === undefined ? "is missing (an object with spring_rate_n_per_mm and motion_ratio)" : "must be an object") },
);

const damperReading = limit("static_damper_mm");

export const CAR_NAME_MAX = 120;

/**
 * The CAR.json schema. Unknown keys are refused (a misspelt optional key would otherwise be
 * dropped without a word).
 */
export const carSchema = z.strictObject(
  {
    name: z
      .string({ error: (iss) => (iss.input === undefined ? "is missing (the car's name)" : "must be a string") })
      .trim()
      .min(1, { error: "must not be empty" })
      .max(CAR_NAME_MAX, { error: `is longer than ${CAR_NAME_MAX} characters` }),
    wheelbase_mm: limit("wheelbase_mm"),
    mass_kg: limit("mass_kg"),
    static_front_weight_pct: limit("static_front_weight_pct"),
    cog_height_mm: limit("cog_height_mm"),
    steering_ratio: limit("steering_ratio"),
    /** Centre of the fuel tank behind the front axle (mm): splits a known fuel burn over the axles. */
    fuel_tank_from_front_axle_mm: limit("fuel_tank_from_front_axle_mm").optional(),
    front: axleSchema,
    rear: axleSchema,
    static_damper_mm: z
      .strictObject({ fl: damperReading, fr: damperReading, rl: damperReading, rr: damperReading }, { error: "must be an object { fl, fr, rl, rr } in mm" })
      .optional(),
    /**
     * The Garage's own details (class, tracks, corner weights, ride heights, aero, names, notes): the analysis
     * does not read them, so a Garage export runs in the CLI as it is; the Garage import checks them
     * (app/lib/garage/car-json-garage.ts).
     */
    garage: z.record(z.string(), z.unknown(), { error: "must be an object (the Garage's own details)" }).optional(),
  },
  { error: "must be a JSON object" },
);

/** One line per problem: the field's path, then what is wrong ("front.motion_ratio must be …"). */
export function carProblems(input: unknown): { ok: true; car: CarInput } | { ok: false; problems: string[] } {
  const r = carSchema.safeParse(input);
  if (r.success) return { ok: true, car: r.data as CarInput };
  const problems = r.error.issues.map((issue) => {
    const where = issue.path.length ? issue.path.join(".") : "car";
    if (issue.code === "unrecognized_keys") {
      const keys = issue.keys.map((k) => `"${k}"`).join(", ");
      return `${where === "car" ? "" : where + ": "}unknown key${issue.keys.length > 1 ? "s" : ""} ${keys} (a car file holds only the CAR.json keys)`;
    }
    return `${where} ${issue.message}`;
  });
  return { ok: false, problems };
}

/** Validate a parsed CAR.json; throws EngineError("bad_car") naming the field and the range. */
export function validateCar(input: unknown): CarInput {
  const r = carProblems(input);
  if (r.ok) return r.car;
  throw new EngineError("bad_car", `car file: ${r.problems[0]}`);
}

/**
 * A bump stop's wheel force against contact depth, as a piecewise-linear curve at the damper:
 * `deflectionMm` starts at 0 (contact) and rises; `forceN` is the force at the damper. Past the last
 * row the last segment's slope carries on. A linear stop is the two rows (0, 0) and (1 mm, rate).
 */
export interface BumpCurve {
  deflectionMm: Float64Array;
  forceN: Float64Array;
}

function bumpCurve(stop: CarInput["front"]["bump_stop"]): BumpCurve | null {
  if (!stop) return null;
  const rows = stop.force_table ?? [{ deflection_mm: 0, force_n: 0 }, { deflection_mm: 1, force_n: stop.rate_n_per_mm }];
  // A table that starts past contact gets the contact point (0 mm, 0 N) in front.
  const all = rows[0].deflection_mm > 0 ? [{ deflection_mm: 0, force_n: 0 }, ...rows] : rows;
  return { deflectionMm: Float64Array.from(all, (r) => r.deflection_mm), forceN: Float64Array.from(all, (r) => r.force_n) };
}

/** Figures derived once per session, SI where not named otherwise. */
export interface CarModel {
  wheelbaseM: number;
  massKg: number;
  frontWeightFraction: number;
  cogHeightM: number;
  steeringRatio: number;
  /** Ks·MR: wheel force per mm of damper travel (N/mm). */
  forcePerMmFront: number;
  forcePerMmRear: number;
  /** Kbs·MR (N/mm) and gap (mm); rate 0 when no bump stop is given (with a table: its least-squares rate). */
  bumpForcePerMmFront: number;
  bumpForcePerMmRear: number;
  bumpGapFrontMm: number;
  bumpGapRearMm: number;
  /** The stops' force curves (null without a stop); the wheel force is MR times the damper force. */
  bumpCurveFront: BumpCurve | null;
  bumpCurveRear: BumpCurve | null;
  motionRatioFront: number;
  motionRatioRear: number;
  staticDamperMm: { fl: number; fr: number; rl: number; rr: number } | null;
  /** Centre of the fuel tank behind the front axle (m); null when the car file does not give it. */
  fuelTankFromFrontAxleM: number | null;
}

export function carModel(car: CarInput): CarModel {
  return {
    wheelbaseM: car.wheelbase_mm / 1000,
    massKg: car.mass_kg,
    frontWeightFraction: car.static_front_weight_pct / 100,
    cogHeightM: car.cog_height_mm / 1000,
    steeringRatio: car.steering_ratio,
    forcePerMmFront: car.front.spring_rate_n_per_mm * car.front.motion_ratio,
    forcePerMmRear: car.rear.spring_rate_n_per_mm * car.rear.motion_ratio,
    bumpForcePerMmFront: car.front.bump_stop ? car.front.bump_stop.rate_n_per_mm * car.front.motion_ratio : 0,
    bumpForcePerMmRear: car.rear.bump_stop ? car.rear.bump_stop.rate_n_per_mm * car.rear.motion_ratio : 0,
    bumpGapFrontMm: car.front.bump_stop ? car.front.bump_stop.gap_mm : Infinity,
    bumpGapRearMm: car.rear.bump_stop ? car.rear.bump_stop.gap_mm : Infinity,
    bumpCurveFront: bumpCurve(car.front.bump_stop),
    bumpCurveRear: bumpCurve(car.rear.bump_stop),
    motionRatioFront: car.front.motion_ratio,
    motionRatioRear: car.rear.motion_ratio,
    staticDamperMm: car.static_damper_mm ?? null,
    fuelTankFromFrontAxleM: car.fuel_tank_from_front_axle_mm === undefined ? null : car.fuel_tank_from_front_axle_mm / 1000,
  };
}

/**
 * CAR.json validation (zod) and the derived figures the physics uses.
 * Rates and bump-stop gaps are at the damper; the gap is measured from the static position.
 * Ranges are wide plausibility limits that catch typing errors (a motion ratio of 7, a mass in
 * pounds), not design limits.
 */
import { z } from "zod";
import { EngineError } from "./errors";
import type { CarInput } from "./types";

function ranged(lo: number, hi: number, unit: string) {
  const what = `a number from ${lo} to ${hi}${unit ? " " + unit : ""}`;
  return z
    .number({ error: (iss) => (iss.input === undefined ? `is missing (${what})` : `must be ${what}, got ${JSON.stringify(iss.input)}`) })
    .refine((v) => Number.isFinite(v) && v >= lo && v <= hi, { error: (iss) => `must be ${what}, got ${String(iss.input)}` });
}

const tableRow = z.object(
  { deflection_mm: ranged(0, 150, "mm from contact"), force_n: ranged(0, 200_000, "N at the damper") },
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

const bumpStopSchema = z.object(
  {
    gap_mm: ranged(0, 150, "mm of damper travel from static"),
    rate_n_per_mm: ranged(1, 20_000, "N/mm at the damper"),
    force_table: forceTable.optional(),
  },
  { error: "must be an object { gap_mm, rate_n_per_mm, force_table? }" },
);

const axleSchema = z.object(
  {
    spring_rate_n_per_mm: ranged(5, 2000, "N/mm at the damper"),
    motion_ratio: ranged(0.3, 1.5, "(damper travel / wheel travel)"),
    bump_stop: bumpStopSchema.optional(),
  },
  { error: (iss) => (iss.input === undefined ? "is missing (an object with spring_rate_n_per_mm and motion_ratio)" : "must be an object") },
);

const damperReading = ranged(-500, 500, "mm");

export const carSchema = z.object(
  {
    name: z.string({ error: "is missing (the car's name)" }).trim().min(1, { error: "must not be empty" }).max(120, { error: "is longer than 120 characters" }),
    wheelbase_mm: ranged(1200, 4500, "mm"),
    mass_kg: ranged(150, 4000, "kg with driver"),
    static_front_weight_pct: ranged(20, 80, "%"),
    cog_height_mm: ranged(100, 1200, "mm"),
    steering_ratio: ranged(4, 40, ": 1 (steering wheel / road wheel)"),
    front: axleSchema,
    rear: axleSchema,
    static_damper_mm: z
      .object({ fl: damperReading, fr: damperReading, rl: damperReading, rr: damperReading }, { error: "must be an object { fl, fr, rl, rr } in mm" })
      .optional(),
  },
  { error: "must be a JSON object" },
);

/** Validate a parsed CAR.json; throws EngineError("bad_car") naming the field and the range. */
export function validateCar(input: unknown): CarInput {
  const r = carSchema.safeParse(input);
  if (r.success) return r.data as CarInput;
  const issue = r.error.issues[0];
  const field = issue.path.length ? issue.path.join(".") : "car";
  throw new EngineError("bad_car", `car file: ${field} ${issue.message}`);
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
  };
}

/**
 * CAR.json: the car file the CLI reads (type CarInput in app/engine/types.ts), exported from a
 * Garage car plus one setup version and imported back. Export writes exactly the CarInput keys in
 * the documented order; import accepts exactly those keys and says which one is wrong.
 */
import { z } from "zod";
import type { CarInput } from "~/engine/types";
import { CAR_FIELDS, SETUP_FIELDS, rangeProblem, type NumberFieldSpec } from "./fields";
import { bumpStopTableProblem, linearRateFromTable, type BumpStopPoint } from "./bump-stop";
import type { BumpStopKind } from "./schemas";

/** The stored car fields export needs. */
export interface CarForExport {
  name: string;
  wheelbaseMm: number;
  massKg: number;
  staticFrontWeightPct: number;
  cogHeightMm: number;
  steeringRatio: number;
}

type AxlePrefix = "front" | "rear";
/** The stored setup fields export needs. */
export type SetupForExport = {
  [K in `${AxlePrefix}SpringRateNPerMm` | `${AxlePrefix}MotionRatio`]: number;
} & {
  [K in `${AxlePrefix}BumpStopKind`]: BumpStopKind;
} & {
  [K in `${AxlePrefix}BumpStopGapMm` | `${AxlePrefix}BumpStopRateNPerMm`]: number | null;
} & {
  [K in `${AxlePrefix}BumpStopTable`]: BumpStopPoint[] | null;
} & {
  [K in "staticDamperFlMm" | "staticDamperFrMm" | "staticDamperRlMm" | "staticDamperRrMm"]: number | null;
};

function axleOut(setup: SetupForExport, axle: AxlePrefix): CarInput["front"] {
  const out: CarInput["front"] = {
    spring_rate_n_per_mm: setup[`${axle}SpringRateNPerMm`],
    motion_ratio: setup[`${axle}MotionRatio`],
  };
  const kind = setup[`${axle}BumpStopKind`];
  const gap = setup[`${axle}BumpStopGapMm`];
  if (kind === "linear" && gap !== null && setup[`${axle}BumpStopRateNPerMm`] !== null) {
    out.bump_stop = { gap_mm: gap, rate_n_per_mm: setup[`${axle}BumpStopRateNPerMm`]! };
  } else if (kind === "table" && gap !== null && setup[`${axle}BumpStopTable`]) {
    const table = setup[`${axle}BumpStopTable`]!;
    // The table itself for the engine; its least-squares rate for tools that read rates only.
    out.bump_stop = {
      gap_mm: gap,
      rate_n_per_mm: linearRateFromTable(table),
      force_table: table.map((p) => ({ deflection_mm: p.deflectionMm, force_n: p.forceN })),
    };
  }
  return out;
}

export function toCarInput(car: CarForExport, setup: SetupForExport): CarInput {
  const out: CarInput = {
    name: car.name,
    wheelbase_mm: car.wheelbaseMm,
    mass_kg: car.massKg,
    static_front_weight_pct: car.staticFrontWeightPct,
    cog_height_mm: car.cogHeightMm,
    steering_ratio: car.steeringRatio,
    front: axleOut(setup, "front"),
    rear: axleOut(setup, "rear"),
  };
  const d = [setup.staticDamperFlMm, setup.staticDamperFrMm, setup.staticDamperRlMm, setup.staticDamperRrMm];
  if (d.every((v) => v !== null)) out.static_damper_mm = { fl: d[0]!, fr: d[1]!, rl: d[2]!, rr: d[3]! };
  return out;
}

/** The file text: two-space JSON with a final newline. */
export function carInputToText(input: CarInput): string {
  return JSON.stringify(input, null, 2) + "\n";
}

function num(spec: NumberFieldSpec, path: string) {
  return z
    .number({ error: (iss) => (iss.input === undefined ? `${path} is missing.` : `${path} must be a number.`) })
    .superRefine((v, ctx) => {
      const problem = rangeProblem(spec, v, "metric");
      if (problem) ctx.addIssue({ code: "custom", message: `${path}: ${problem}` });
    });
}

function axleSchema(axle: AxlePrefix) {
  const f = SETUP_FIELDS;
  return z.strictObject(
    {
      spring_rate_n_per_mm: num(f[`${axle}SpringRateNPerMm`], `${axle}.spring_rate_n_per_mm`),
      motion_ratio: num(f[`${axle}MotionRatio`], `${axle}.motion_ratio`),
      bump_stop: z
        .strictObject(
          {
            gap_mm: num(f[`${axle}BumpStopGapMm`], `${axle}.bump_stop.gap_mm`),
            rate_n_per_mm: num(f[`${axle}BumpStopRateNPerMm`], `${axle}.bump_stop.rate_n_per_mm`),
            force_table: z
              .array(
                z.strictObject(
                  {
                    deflection_mm: z.number({ error: `${axle}.bump_stop.force_table rows need a number deflection_mm.` }),
                    force_n: z.number({ error: `${axle}.bump_stop.force_table rows need a number force_n.` }),
                  },
                  { error: `${axle}.bump_stop.force_table rows must be objects {"deflection_mm", "force_n"}.` },
                ),
                { error: `${axle}.bump_stop.force_table must be a list of {"deflection_mm", "force_n"} rows.` },
              )
              .superRefine((rows, ctx) => {
                const problem = bumpStopTableProblem(rows.map((r) => ({ deflectionMm: r.deflection_mm, forceN: r.force_n })));
                if (problem) ctx.addIssue({ code: "custom", message: `${axle}.bump_stop.force_table: ${problem}` });
              })
              .optional(),
          },
          { error: `${axle}.bump_stop must be an object {"gap_mm", "rate_n_per_mm", "force_table"?}.` },
        )
        .optional(),
    },
    { error: `${axle} must be an object {"spring_rate_n_per_mm", "motion_ratio", "bump_stop"?}.` },
  );
}

const damperPath = (c: string) => num(SETUP_FIELDS.staticDamperFlMm, `static_damper_mm.${c}`);

export const carInputSchema = z.strictObject(
  {
    name: z
      .string({ error: "name must be a string." })
      .trim()
      .min(1, { error: "name must not be empty." })
      .max(CAR_FIELDS.name.maxLength, { error: `name is longer than ${CAR_FIELDS.name.maxLength} characters.` }),
    wheelbase_mm: num(CAR_FIELDS.wheelbaseMm, "wheelbase_mm"),
    mass_kg: num(CAR_FIELDS.massKg, "mass_kg"),
    static_front_weight_pct: num(CAR_FIELDS.staticFrontWeightPct, "static_front_weight_pct"),
    cog_height_mm: num(CAR_FIELDS.cogHeightMm, "cog_height_mm"),
    steering_ratio: num(CAR_FIELDS.steeringRatio, "steering_ratio"),
    front: axleSchema("front"),
    rear: axleSchema("rear"),
    static_damper_mm: z
      .strictObject(
        { fl: damperPath("fl"), fr: damperPath("fr"), rl: damperPath("rl"), rr: damperPath("rr") },
        { error: 'static_damper_mm must be an object {"fl", "fr", "rl", "rr"}.' },
      )
      .optional(),
  },
  { error: "A car file must be a JSON object." },
);

export type ImportResult = { ok: true; car: CarInput } | { ok: false; errors: string[] };

/** Parses a CAR.json text; every problem is one line naming the key. */
export function parseCarInputText(text: string): ImportResult {
  let json: unknown;
  try {
    json = JSON.parse(text.replace(/^\uFEFF/, ""));
  } catch (e) {
    return { ok: false, errors: [`The file is not valid JSON (${(e as Error).message}).`] };
  }
  const result = carInputSchema.safeParse(json);
  if (result.success) return { ok: true, car: json as CarInput };
  const errors = result.error.issues.map((issue) => {
    if (issue.code === "unrecognized_keys") {
      const where = issue.path.length ? `${issue.path.join(".")}: ` : "";
      return `${where}unknown key${issue.keys.length > 1 ? "s" : ""} ${issue.keys.map((k) => `"${k}"`).join(", ")} (a car file holds exactly the CAR.json keys).`;
    }
    return issue.message;
  });
  return { ok: false, errors };
}

/** Stored car and setup values from a car file (a stop with a force_table becomes a table stop). */
export function fromCarInput(input: CarInput): { car: CarForExport; setup: SetupForExport } {
  const axle = (a: CarInput["front"]) => {
    const table = a.bump_stop?.force_table;
    return {
      spring: a.spring_rate_n_per_mm,
      mr: a.motion_ratio,
      kind: (!a.bump_stop ? "none" : table ? "table" : "linear") as BumpStopKind,
      gap: a.bump_stop?.gap_mm ?? null,
      // A table stop stores the table; its rate is derived from it again at export.
      rate: a.bump_stop && !table ? a.bump_stop.rate_n_per_mm : null,
      table: table ? table.map((r): BumpStopPoint => ({ deflectionMm: r.deflection_mm, forceN: r.force_n })) : null,
    };
  };
  const f = axle(input.front);
  const r = axle(input.rear);
  const d = input.static_damper_mm;
  return {
    car: {
      name: input.name,
      wheelbaseMm: input.wheelbase_mm,
      massKg: input.mass_kg,
      staticFrontWeightPct: input.static_front_weight_pct,
      cogHeightMm: input.cog_height_mm,
      steeringRatio: input.steering_ratio,
    },
    setup: {
      frontSpringRateNPerMm: f.spring,
      frontMotionRatio: f.mr,
      frontBumpStopKind: f.kind,
      frontBumpStopGapMm: f.gap,
      frontBumpStopRateNPerMm: f.rate,
      frontBumpStopTable: f.table,
      rearSpringRateNPerMm: r.spring,
      rearMotionRatio: r.mr,
      rearBumpStopKind: r.kind,
      rearBumpStopGapMm: r.gap,
      rearBumpStopRateNPerMm: r.rate,
      rearBumpStopTable: r.table,
      staticDamperFlMm: d?.fl ?? null,
      staticDamperFrMm: d?.fr ?? null,
      staticDamperRlMm: d?.rl ?? null,
      staticDamperRrMm: d?.rr ?? null,
    },
  };
}

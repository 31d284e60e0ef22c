/**
 * CAR.json: the car file the CLI reads (type CarInput in app/engine/types.ts), exported from a
 * Garage car plus one setup version and imported back. Export writes exactly the CarInput keys in
 * the documented order; import accepts exactly those keys and says which one is wrong.
 */
import { carProblems } from "~/engine/car";
import type { CarInput } from "~/engine/types";
import { linearRateFromTable, type BumpStopPoint } from "./bump-stop";
import type { BumpStopKind } from "./schemas";
import { fromGarageBlock, garageBlockOf, garageBlockProblems, type GarageCarExtras, type GarageSetupExtras } from "./car-json-garage";

/** A car file as the Garage writes it: the analysis' keys plus the optional `garage` block. */
export type CarFile = CarInput & { garage?: Record<string, unknown> };

/** The stored car fields export needs. */
export interface CarForExport {
  name: string;
  wheelbaseMm: number;
  massKg: number;
  staticFrontWeightPct: number;
  cogHeightMm: number;
  steeringRatio: number;
  /** Centre of the fuel tank behind the front axle (mm), when the Garage knows it. */
  fuelTankFromFrontAxleMm?: number | null;
}

/** A stored car as export reads it: the analysis' fields and, when known, the Garage's own. */
export type GarageCarForExport = CarForExport & Partial<GarageCarExtras>;
/** A stored setup version as export reads it. */
export type GarageSetupForExport = SetupForExport & Partial<GarageSetupExtras>;

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

/** The car file of a car and one setup version; the Garage's own fields go in the `garage` block. */
export function toCarInput(car: GarageCarForExport, setup: GarageSetupForExport): CarFile {
  const out: CarFile = analysisPart(car, setup);
  const garage = garageBlockOf(car, setup);
  if (garage) out.garage = garage;
  return out;
}

function analysisPart(car: CarForExport, setup: SetupForExport): CarInput {
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
  if (car.fuelTankFromFrontAxleMm !== undefined && car.fuelTankFromFrontAxleMm !== null) {
    // CAR.json key order: the tank position follows the steering ratio.
    const { front, rear, ...head } = out;
    return withDampers({ ...head, fuel_tank_from_front_axle_mm: car.fuelTankFromFrontAxleMm, front, rear }, setup);
  }
  return withDampers(out, setup);
}

function withDampers(out: CarInput, setup: SetupForExport): CarInput {
  const d = [setup.staticDamperFlMm, setup.staticDamperFrMm, setup.staticDamperRlMm, setup.staticDamperRrMm];
  if (d.every((v) => v !== null)) out.static_damper_mm = { fl: d[0]!, fr: d[1]!, rl: d[2]!, rr: d[3]! };
  return out;
}

/** The file text: two-space JSON with a final newline. */
export function carInputToText(input: CarInput): string {
  return JSON.stringify(input, null, 2) + "\n";
}

export type ImportResult = { ok: true; car: CarFile } | { ok: false; errors: string[] };

/**
 * Parses a CAR.json text with the engine's own schema (app/engine/car.ts carSchema), so the Garage
 * takes exactly the files the CLI takes; every problem is one line naming the key (a bump-stop
 * table is checked there by the same rules as the Garage form's, bump-stop.ts).
 */
export function parseCarInputText(text: string): ImportResult {
  let json: unknown;
  try {
    json = JSON.parse(text.replace(/^\uFEFF/, ""));
  } catch (e) {
    return { ok: false, errors: [`The file is not valid JSON (${(e as Error).message}).`] };
  }
  const result = carProblems(json);
  if (!result.ok) return { ok: false, errors: result.problems.map((p) => `${p}.`) };
  const file = json as CarFile;
  if (file.garage) {
    const problems = garageBlockProblems(file.garage, file);
    if (problems.length) return { ok: false, errors: problems.map((p) => (p.endsWith(".") ? p : `${p}.`)) };
  }
  return { ok: true, car: file };
}

/**
 * Stored car and setup values from a car file (a stop with a force_table becomes a table stop); the
 * `garage` block's fields are null when the file has none.
 */
export function fromCarInput(input: CarFile): { car: CarForExport & GarageCarExtras; setup: SetupForExport & GarageSetupExtras } {
  const garage = fromGarageBlock(input.garage);
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
      fuelTankFromFrontAxleMm: input.fuel_tank_from_front_axle_mm ?? null,
      ...garage.car,
    },
    setup: {
      ...garage.setup,
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

/**
 * The `garage` block of a CAR.json: what the Garage holds beyond the analysis' own keys (class, tracks,
 * tyre stiffness, fuel density, corner weights, ride heights, anti-roll bars, aero, names and notes), so
 * an export imports back with nothing lost. The engine accepts the block and does not read it
 * (app/engine/car.ts); this file checks it with the Garage forms' own field ranges (fields.ts).
 */
import { CAR_FIELDS, SETUP_FIELDS, rangeProblem, type NumberFieldSpec, type TextFieldSpec } from "./fields";
import { summariseCornerWeights } from "./corner-weights";
import { FRONT_PCT_TOLERANCE, massTolerance } from "./schemas";

/** Garage car fields beyond the analysis' own, as stored (null = not given). */
export interface GarageCarExtras {
  category: string | null;
  trackFrontMm: number | null;
  trackRearMm: number | null;
  tyreVerticalStiffnessNPerMm: number | null;
  fuelDensityKgPerL: number | null;
  cornerFlKg: number | null;
  cornerFrKg: number | null;
  cornerRlKg: number | null;
  cornerRrKg: number | null;
  weighedWithDriver: boolean;
  weighedFuelL: number | null;
  notes: string | null;
}

/** Garage setup fields beyond the analysis' own, as stored. */
export interface GarageSetupExtras {
  sheetName: string | null;
  rideHeightFrontMm: number | null;
  rideHeightRearMm: number | null;
  arbFront: string | null;
  arbRear: string | null;
  rearWingAngleDeg: number | null;
  rearWingStep: string | null;
  frontAero: string | null;
  aeroNotes: string | null;
  notes: string | null;
  changeNote: string | null;
}

type Key = { file: string; side: "car" | "setup"; field: string; spec: NumberFieldSpec | TextFieldSpec | "boolean" };

/** File key ↔ stored field, in the order the export writes them. */
const KEYS: Key[] = [
  { file: "category", side: "car", field: "category", spec: CAR_FIELDS.category },
  { file: "track_front_mm", side: "car", field: "trackFrontMm", spec: CAR_FIELDS.trackFrontMm },
  { file: "track_rear_mm", side: "car", field: "trackRearMm", spec: CAR_FIELDS.trackRearMm },
  { file: "tyre_vertical_stiffness_n_per_mm", side: "car", field: "tyreVerticalStiffnessNPerMm", spec: CAR_FIELDS.tyreVerticalStiffnessNPerMm },
  { file: "fuel_density_kg_per_l", side: "car", field: "fuelDensityKgPerL", spec: CAR_FIELDS.fuelDensityKgPerL },
  { file: "corner_fl_kg", side: "car", field: "cornerFlKg", spec: CAR_FIELDS.cornerFlKg },
  { file: "corner_fr_kg", side: "car", field: "cornerFrKg", spec: CAR_FIELDS.cornerFrKg },
  { file: "corner_rl_kg", side: "car", field: "cornerRlKg", spec: CAR_FIELDS.cornerRlKg },
  { file: "corner_rr_kg", side: "car", field: "cornerRrKg", spec: CAR_FIELDS.cornerRrKg },
  { file: "weighed_with_driver", side: "car", field: "weighedWithDriver", spec: "boolean" },
  { file: "weighed_fuel_l", side: "car", field: "weighedFuelL", spec: CAR_FIELDS.weighedFuelL },
  { file: "car_notes", side: "car", field: "notes", spec: CAR_FIELDS.notes },
  { file: "setup_name", side: "setup", field: "sheetName", spec: SETUP_FIELDS.name },
  { file: "ride_height_front_mm", side: "setup", field: "rideHeightFrontMm", spec: SETUP_FIELDS.rideHeightFrontMm },
  { file: "ride_height_rear_mm", side: "setup", field: "rideHeightRearMm", spec: SETUP_FIELDS.rideHeightRearMm },
  { file: "arb_front", side: "setup", field: "arbFront", spec: SETUP_FIELDS.arbFront },
  { file: "arb_rear", side: "setup", field: "arbRear", spec: SETUP_FIELDS.arbRear },
  { file: "rear_wing_angle_deg", side: "setup", field: "rearWingAngleDeg", spec: SETUP_FIELDS.rearWingAngleDeg },
  { file: "rear_wing_step", side: "setup", field: "rearWingStep", spec: SETUP_FIELDS.rearWingStep },
  { file: "front_aero", side: "setup", field: "frontAero", spec: SETUP_FIELDS.frontAero },
  { file: "aero_notes", side: "setup", field: "aeroNotes", spec: SETUP_FIELDS.aeroNotes },
  { file: "setup_notes", side: "setup", field: "notes", spec: SETUP_FIELDS.notes },
  { file: "change_note", side: "setup", field: "changeNote", spec: SETUP_FIELDS.changeNote },
];

export const GARAGE_FILE_KEYS = KEYS.map((k) => k.file);

/** The block to write, or undefined when the Garage holds nothing beyond the analysis' keys. */
export function garageBlockOf(car: Partial<GarageCarExtras>, setup: Partial<GarageSetupExtras>): Record<string, unknown> | undefined {
  const out: Record<string, unknown> = {};
  for (const key of KEYS) {
    const value = (key.side === "car" ? (car as Record<string, unknown>) : (setup as Record<string, unknown>))[key.field];
    if (value === null || value === undefined || value === "") continue;
    if (key.spec === "boolean" && value !== true) continue;
    out[key.file] = value;
  }
  return Object.keys(out).length ? out : undefined;
}

const EMPTY_CAR: GarageCarExtras = {
  category: null, trackFrontMm: null, trackRearMm: null, tyreVerticalStiffnessNPerMm: null, fuelDensityKgPerL: null,
  cornerFlKg: null, cornerFrKg: null, cornerRlKg: null, cornerRrKg: null, weighedWithDriver: false, weighedFuelL: null, notes: null,
};
const EMPTY_SETUP: GarageSetupExtras = {
  sheetName: null, rideHeightFrontMm: null, rideHeightRearMm: null, arbFront: null, arbRear: null, rearWingAngleDeg: null,
  rearWingStep: null, frontAero: null, aeroNotes: null, notes: null, changeNote: null,
};

/** Stored values from a block already checked by garageBlockProblems. */
export function fromGarageBlock(block: Record<string, unknown> | undefined): { car: GarageCarExtras; setup: GarageSetupExtras } {
  const car: Record<string, unknown> = { ...EMPTY_CAR };
  const setup: Record<string, unknown> = { ...EMPTY_SETUP };
  for (const key of KEYS) {
    if (!block || !(key.file in block)) continue;
    (key.side === "car" ? car : setup)[key.field] = block[key.file];
  }
  return { car: car as unknown as GarageCarExtras, setup: setup as unknown as GarageSetupExtras };
}

/**
 * Every problem of a `garage` block, one line each naming the key ("garage.track_front_mm …"): unknown keys,
 * wrong types, values outside the Garage form's ranges, corner weights that disagree with the file's mass.
 */
export function garageBlockProblems(block: Record<string, unknown>, car: { mass_kg: number; static_front_weight_pct: number }): string[] {
  const problems: string[] = [];
  const known = new Set(GARAGE_FILE_KEYS);
  const unknown = Object.keys(block).filter((k) => !known.has(k));
  if (unknown.length) problems.push(`garage: unknown key${unknown.length > 1 ? "s" : ""} ${unknown.map((k) => `"${k}"`).join(", ")} (the block holds only ${GARAGE_FILE_KEYS.join(", ")})`);
  for (const key of KEYS) {
    if (!(key.file in block)) continue;
    const value = block[key.file];
    const where = `garage.${key.file}`;
    if (value === null) continue;
    if (key.spec === "boolean") {
      if (typeof value !== "boolean") problems.push(`${where} must be true or false`);
    } else if (key.spec.kind === "text") {
      if (typeof value !== "string") problems.push(`${where} must be a string`);
      else if (value.length > key.spec.maxLength) problems.push(`${where} is ${value.length} characters; the Garage keeps at most ${key.spec.maxLength}`);
    } else if (typeof value !== "number" || !Number.isFinite(value)) {
      problems.push(`${where} must be a number, got ${JSON.stringify(value)}`);
    } else {
      const problem = rangeProblem(key.spec, value, "metric");
      if (problem) problems.push(`${where}: ${problem}`);
    }
  }
  if (problems.length) return problems;
  const corners = ["corner_fl_kg", "corner_fr_kg", "corner_rl_kg", "corner_rr_kg"].map((k) => block[k] as number | null | undefined);
  const given = corners.filter((c) => typeof c === "number").length;
  if (given > 0 && given < 4) problems.push("garage: give all four corner weights (corner_fl_kg, corner_fr_kg, corner_rl_kg, corner_rr_kg) or none");
  if (given === 4) {
    const sum = summariseCornerWeights({ fl: corners[0]!, fr: corners[1]!, rl: corners[2]!, rr: corners[3]! });
    if (Math.abs(sum.totalKg - car.mass_kg) > massTolerance(car.mass_kg))
      problems.push(`garage: the corner weights add up to ${Number(sum.totalKg.toFixed(1))} kg but mass_kg is ${car.mass_kg}`);
    if (Math.abs(sum.staticFrontPct - car.static_front_weight_pct) > FRONT_PCT_TOLERANCE)
      problems.push(`garage: the corner weights give ${sum.staticFrontPct.toFixed(1)} % front but static_front_weight_pct is ${car.static_front_weight_pct}`);
  }
  return problems;
}

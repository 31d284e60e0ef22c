/**
 * Fuel as a known input. A stint burns fuel from a tank whose centre sits at a known distance behind
 * the front axle; the static axle loads fall with it. Given the fuel at the start and at the end of
 * the log, the burn is taken as linear in time and split over the axles by the tank position (moment
 * balance about each axle, the same lever rule as the static weight split).
 */
import { STANDARD_GRAVITY_M_PER_S2 } from "./units";
import { EngineError } from "./errors";

/**
 * Default petrol density, kg/L at 15 °C. EN 228 (unleaded petrol) allows 720–775 kg/m³ at 15 °C
 * (from memory); 0.745 kg/L, mid-range, is the usual figure for race petrol (common practice). Give
 * the fuel supplier's figure where it is known: race fuels range wider.
 */
export const DEFAULT_PETROL_DENSITY_KG_PER_L = 0.745;

/** Fuel mass (kg) from a volume (L) and a density (kg/L, default petrol). Throws on impossible input. */
export function fuelMassKg(litres: number, densityKgPerL: number = DEFAULT_PETROL_DENSITY_KG_PER_L): number {
  if (typeof litres !== "number" || !Number.isFinite(litres) || litres < 0 || litres > 1000) {
    throw new EngineError("bad_options", `fuel volume must be a number from 0 to 1000 L, got ${String(litres)}`);
  }
  if (typeof densityKgPerL !== "number" || !Number.isFinite(densityKgPerL) || densityKgPerL < 0.5 || densityKgPerL > 1.2) {
    throw new EngineError("bad_options", `fuel density must be a number from 0.5 to 1.2 kg/L, got ${String(densityKgPerL)}`);
  }
  return litres * densityKgPerL;
}

/** Fuel at the start and at the end of a log (kg). */
export interface FuelGiven {
  startKg: number;
  endKg: number;
}

/** Checks a fuel pair: both from 0 to 1000 kg, the end not above the start (a stint burns fuel). */
export function validateFuel(fuel: FuelGiven): FuelGiven {
  if (typeof fuel !== "object" || fuel === null) throw new EngineError("bad_options", "fuel must be an object { startKg, endKg }");
  const check = (name: string, v: unknown) => {
    if (typeof v !== "number" || !Number.isFinite(v) || v < 0 || v > 1000) throw new EngineError("bad_options", `${name} must be a number from 0 to 1000 kg, got ${String(v)}`);
  };
  check("fuel at the start", fuel.startKg);
  check("fuel at the end", fuel.endKg);
  if (fuel.endKg > fuel.startKg) throw new EngineError("bad_options", `fuel at the end (${fuel.endKg} kg) is more than at the start (${fuel.startKg} kg): a stint burns fuel; were the two swapped?`);
  return { startKg: fuel.startKg, endKg: fuel.endKg };
}

/**
 * Change of the static axle loads (N) when `deltaKg` of fuel is added (negative: burnt), for a tank
 * `tankFromFrontM` behind the front axle on a wheelbase `wheelbaseM`: the front takes the share
 * (1 − x/L), the rear x/L (moments about each axle).
 */
export function fuelAxleLoadChangeN(deltaKg: number, tankFromFrontM: number, wheelbaseM: number): { front: number; rear: number } {
  const w = deltaKg * STANDARD_GRAVITY_M_PER_S2;
  const rearShare = tankFromFrontM / wheelbaseM;
  return { front: w * (1 - rearShare), rear: w * rearShare };
}

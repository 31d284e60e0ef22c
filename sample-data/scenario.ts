/**
 * The demo scenario (invented, for the demo only): Harrowgate Motor Club runs two cars,
 * the Marlin SR2 club sports-racer and the Vesper GT4-R closed GT, at Kestrel Bank Raceway
 * (3.1 km) and up the Coldwater Ridge hill-climb. Magnitudes are plausible, not measured.
 */
import type { CarInput } from "../app/engine/types";
import type { SimCar } from "./sim";
import type { TrackLayout } from "./track";

export const CLUB = "Harrowgate Motor Club";

/** Kestrel Bank Raceway: two straights, two slow hairpins, medium corners and fast sweepers. */
export const KESTREL_BANK: TrackLayout = {
  name: "Kestrel Bank Raceway",
  transition_m: 30,
  segments: [
    { length_m: 500 },
    { length_m: 73, radius_m: -24, target_kmh: 64 }, // Mill hairpin
    { length_m: 150 },
    { length_m: 89, radius_m: 60, target_kmh: 100 }, // Heron
    { length_m: 120 },
    { length_m: 140, radius_m: -100, target_kmh: 135 }, // Long Acre
    { length_m: 300 },
    { length_m: 182, radius_m: 190, target_kmh: 178 }, // Bank Sweep
    { length_m: 520 }, // back straight
    { length_m: 84, radius_m: 30, target_kmh: 62 }, // Tollgate hairpin
    { length_m: 160 },
    { length_m: 80, radius_m: -55, target_kmh: 86 }, // Chapel
    { length_m: 120 },
    { length_m: 149, radius_m: 115, target_kmh: 127 }, // Warren
    { length_m: 200 },
    { length_m: 209, radius_m: -220, target_kmh: 170 }, // Ridgeway
    { length_m: 24 },
  ],
};

/** Coldwater Ridge hill-climb (1.9 km, one way; gradient not simulated). */
export const COLDWATER_RIDGE: TrackLayout = {
  name: "Coldwater Ridge hill-climb",
  transition_m: 25,
  segments: [
    { length_m: 260 },
    { length_m: 70, radius_m: 40, target_kmh: 80 },
    { length_m: 180 },
    { length_m: 110, radius_m: -70, target_kmh: 105 },
    { length_m: 240 },
    { length_m: 60, radius_m: 22, target_kmh: 58 },
    { length_m: 150 },
    { length_m: 130, radius_m: -120, target_kmh: 130 },
    { length_m: 300 },
    { length_m: 90, radius_m: 35, target_kmh: 72 },
    { length_m: 310 },
  ],
};

export const MARLIN_SR2: SimCar = {
  name: "Marlin SR2",
  massKg: 620, wheelbaseM: 2.45, frontWeightFraction: 0.42, cogHeightM: 0.38, trackWidthM: 1.5,
  steeringRatio: 11.5, steeringOffsetDeg: 1.8, chassisLagS: 0.12,
  claFrontM2: 0.45, claRearM2: 0.75, claFrontPerMmDrop: 0.004, cdaM2: 0.85,
  powerW: 150_000, muLat: 1.55, muBrake: 1.5, cornerSpeedFactor: 1,
  tyreRateNPerMm: 280, loadSensitivity: 0.15,
  fuelBurnKgPerS: 0.019, fuelTankFromFrontAxleMm: 1350,
  front: { springNPerMm: 100, motionRatio: 0.95, bumpGapMm: 9, bumpRateNPerMm: 250, rollSpringShare: 0.6, staticRideHeightMm: 45, corneringCoeffPerRad: 12 },
  rear: { springNPerMm: 120, motionRatio: 0.9, bumpGapMm: 14, bumpRateNPerMm: 300, rollSpringShare: 0.6, staticRideHeightMm: 60, corneringCoeffPerRad: 14.5 },
  staticDamperMm: { fl: 31.2, fr: 29.8, rl: 35.5, rr: 36.1 },
};

export const VESPER_GT4R: SimCar = {
  name: "Vesper GT4-R",
  massKg: 1350, wheelbaseM: 2.6, frontWeightFraction: 0.51, cogHeightM: 0.48, trackWidthM: 1.62,
  steeringRatio: 14, steeringOffsetDeg: -4.2, chassisLagS: 0.15,
  claFrontM2: 0.52, claRearM2: 0.78, claFrontPerMmDrop: 0.003, cdaM2: 0.95,
  powerW: 330_000, muLat: 1.45, muBrake: 1.45, cornerSpeedFactor: 0.96,
  tyreRateNPerMm: 320, loadSensitivity: 0.12,
  fuelBurnKgPerS: 0.028, fuelTankFromFrontAxleMm: 1700,
  front: { springNPerMm: 160, motionRatio: 0.8, bumpGapMm: 12, bumpRateNPerMm: 500, rollSpringShare: 0.55, staticRideHeightMm: 70, corneringCoeffPerRad: 10.5 },
  rear: { springNPerMm: 180, motionRatio: 0.75, bumpGapMm: 25, bumpRateNPerMm: 400, rollSpringShare: 0.55, staticRideHeightMm: 85, corneringCoeffPerRad: 12.5 },
  staticDamperMm: { fl: 42.0, fr: 43.4, rl: 38.9, rr: 38.1 },
};

/**
 * The Marlin with its low splitter fitted: the front is in ground effect, so its ClA climbs steeply
 * as the nose drops and the balance moves forward with speed (about 3 points from the 80–120 to the
 * 160+ km/h band). The car file is the same: aero is what the engine measures. The fuel's share on
 * each axle follows from the tank position in the car file.
 */
export const MARLIN_SR2_SPLITTER: SimCar = { ...MARLIN_SR2, claFrontPerMmDrop: 0.035 };

/** The CAR.json a team would type in the Garage for a simulated car. */
export function carFile(car: SimCar, withStatic: boolean): CarInput {
  const axle = (a: SimCar["front"]) => ({ spring_rate_n_per_mm: a.springNPerMm, motion_ratio: a.motionRatio, bump_stop: { gap_mm: a.bumpGapMm, rate_n_per_mm: a.bumpRateNPerMm } });
  return {
    name: car.name,
    wheelbase_mm: Math.round(car.wheelbaseM * 1000),
    mass_kg: car.massKg,
    static_front_weight_pct: car.frontWeightFraction * 100,
    cog_height_mm: Math.round(car.cogHeightM * 1000),
    steering_ratio: car.steeringRatio,
    fuel_tank_from_front_axle_mm: car.fuelTankFromFrontAxleMm,
    front: axle(car.front),
    rear: axle(car.rear),
    ...(withStatic ? { static_damper_mm: { ...car.staticDamperMm } } : {}),
  };
}

/**
 * Corner weights from the scales → total mass, static front %, cross weight and CoG position.
 *
 * Conventions (stated on screen too):
 * - Static front % = (FL + FR) / total × 100.
 * - Cross weight % = (FR + RL) / total × 100 (the diagonal from the right front). 50 % = balanced diagonals.
 * - CoG from the front axle = wheelbase × rear fraction, rear fraction = (RL + RR) / total (moment balance).
 */

export interface CornerWeightsKg {
  fl: number;
  fr: number;
  rl: number;
  rr: number;
}

export interface CornerWeightSummary {
  totalKg: number;
  frontKg: number;
  rearKg: number;
  staticFrontPct: number;
  leftPct: number;
  /** (FR + RL) / total × 100. */
  crossPct: number;
  /** Wheelbase × rear fraction; null without a wheelbase. */
  cogFromFrontAxleMm: number | null;
}

export function summariseCornerWeights(weights: CornerWeightsKg, wheelbaseMm?: number | null): CornerWeightSummary {
  const frontKg = weights.fl + weights.fr;
  const rearKg = weights.rl + weights.rr;
  const totalKg = frontKg + rearKg;
  const rearFraction = rearKg / totalKg;
  return {
    totalKg,
    frontKg,
    rearKg,
    staticFrontPct: (frontKg / totalKg) * 100,
    leftPct: ((weights.fl + weights.rl) / totalKg) * 100,
    crossPct: ((weights.fr + weights.rl) / totalKg) * 100,
    cogFromFrontAxleMm: wheelbaseMm ? wheelbaseMm * rearFraction : null,
  };
}

/** CoG from the front axle from a total-mass description: L × (1 − front fraction). */
export function cogFromFrontAxleMm(wheelbaseMm: number, staticFrontPct: number): number {
  return wheelbaseMm * (1 - staticFrontPct / 100);
}

/**
 * Mass and static front % after adding (positive) or burning (negative) fuel at a tank whose
 * centre lies `tankFromFrontAxleMm` behind the front axle. Moment balance about the rear axle:
 * the front axle carries Δm·(L − x)/L of the added mass.
 */
export function withFuelChange(input: {
  massKg: number;
  staticFrontPct: number;
  wheelbaseMm: number;
  fuelChangeL: number;
  fuelDensityKgPerL: number;
  tankFromFrontAxleMm: number;
}): { massKg: number; staticFrontPct: number; fuelMassChangeKg: number } {
  const fuelMassChangeKg = input.fuelChangeL * input.fuelDensityKgPerL;
  const frontKg =
    (input.massKg * input.staticFrontPct) / 100 +
    (fuelMassChangeKg * (input.wheelbaseMm - input.tankFromFrontAxleMm)) / input.wheelbaseMm;
  const massKg = input.massKg + fuelMassChangeKg;
  return { massKg, staticFrontPct: (frontKg / massKg) * 100, fuelMassChangeKg };
}

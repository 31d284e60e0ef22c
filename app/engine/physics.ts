/**
 * Per-sample physics (app/engine/README.md §1 conventions): damper travel positive in compression,
 * MR = damper travel / wheel travel, rates and gaps at the damper.
 * Pure scalar functions; the summary runs these very functions (summary-loop.ts, summary-bands.ts),
 * so the tests that check them against textbook formulas check the summary's arithmetic.
 */
import { STANDARD_GRAVITY_M_PER_S2 } from "./units";

export const DEG_PER_RAD = 180 / Math.PI;

/**
 * Wheel-force change from damper travel relative to static (virtual work: ΔFw = Ks·MR·Δx),
 * plus the bump-stop term Kbs·MR·max(0, Δx − gap). Forces in N, travel in mm, rates in N/mm.
 */
export function wheelForceChangeN(deltaDamperMm: number, springRateNPerMm: number, motionRatio: number, bumpGapMm = Infinity, bumpRateNPerMm = 0): number {
  const contact = Math.max(0, deltaDamperMm - bumpGapMm);
  return springRateNPerMm * motionRatio * deltaDamperMm + bumpRateNPerMm * motionRatio * contact;
}

/**
 * Bump-stop force at the damper (N) at `contactMm` past contact (≤ 0: none), read off a
 * piecewise-linear force/deflection curve whose first row is contact (0 mm); past the last row the
 * last segment's slope carries on. The curve holds at least two rows.
 */
export function bumpStopForceN(contactMm: number, deflectionMm: ArrayLike<number>, forceN: ArrayLike<number>): number {
  if (!(contactMm > 0)) return 0;
  const last = deflectionMm.length - 1;
  let i = 1;
  while (i < last && deflectionMm[i] < contactMm) i++;
  const x0 = deflectionMm[i - 1], x1 = deflectionMm[i], f0 = forceN[i - 1];
  return f0 + ((contactMm - x0) * (forceN[i] - f0)) / (x1 - x0);
}

/** Wheel rate Kw = Ks·MR² (N/mm at the wheel). */
export function wheelRateNPerMm(springRateNPerMm: number, motionRatio: number): number {
  return springRateNPerMm * motionRatio * motionRatio;
}

/**
 * Longitudinal load transfer on the front axle through the springs: ΔFz_front = −m·ax·h/L
 * (ax positive forward, m/s²). The rear gets the opposite.
 */
export function frontLoadTransferN(massKg: number, axMs2: number, cogHeightM: number, wheelbaseM: number): number {
  return (-massKg * axMs2 * cogHeightM) / wheelbaseM;
}

/** Dynamic pressure q = ½ρV² (Pa). */
export function dynamicPressurePa(densityKgM3: number, speedMs: number): number {
  return 0.5 * densityKgM3 * speedMs * speedMs;
}

/** Balance % front from the axle ClA values. */
export function balanceFrontPct(claFront: number, claRear: number): number {
  return (100 * claFront) / (claFront + claRear);
}

/** Centre of pressure from the front axle (mm): L·(1 − %F). */
export function copFromFrontAxleMm(wheelbaseMm: number, balanceFrontPctValue: number): number {
  return wheelbaseMm * (1 - balanceFrontPctValue / 100);
}

/** Centre of gravity from the front axle (mm): L·(1 − w_f). */
export function cogFromFrontAxleMm(wheelbaseMm: number, staticFrontWeightPct: number): number {
  return wheelbaseMm * (1 - staticFrontWeightPct / 100);
}

/**
 * Ride-height change at an axle (mm, positive = higher) from the mean damper travel change and the
 * wheel-force change: ΔRH = −Δx/MR − ΔFw/Kt (tyre rate Kt in N/mm).
 */
export function rideHeightChangeMm(deltaDamperMm: number, motionRatio: number, wheelForceChangeNValue: number, tyreRateNPerMm: number): number {
  return -deltaDamperMm / motionRatio - wheelForceChangeNValue / tyreRateNPerMm;
}

/**
 * Steady-state steering (Gillespie, Fundamentals of Vehicle Dynamics, ch. 6):
 * δ = 57.3·L/R + K·ay, δ road-wheel angle (deg), ay in g, K in deg/g.
 */
export function steadyStateSteerDeg(wheelbaseM: number, radiusM: number, understeerDegPerG: number, ayG: number): number {
  return (DEG_PER_RAD * wheelbaseM) / radiusM + understeerDegPerG * ayG;
}

/** K = (Wf/Cαf − Wr/Cαr) in deg/g from axle loads (N) and axle cornering stiffness (N/rad). */
export function understeerGradientDegPerG(frontLoadN: number, rearLoadN: number, corneringStiffnessFrontNPerRad: number, corneringStiffnessRearNPerRad: number): number {
  return DEG_PER_RAD * (frontLoadN / corneringStiffnessFrontNPerRad - rearLoadN / corneringStiffnessRearNPerRad);
}

/** Characteristic speed √(57.3·L·g/K) (m/s) for K > 0 deg/g; null otherwise. */
export function characteristicSpeedMs(wheelbaseM: number, understeerDegPerG: number): number | null {
  return understeerDegPerG > 0 ? Math.sqrt((DEG_PER_RAD * wheelbaseM * STANDARD_GRAVITY_M_PER_S2) / understeerDegPerG) : null;
}

/** Critical speed √(−57.3·L·g/K) (m/s) for K < 0 deg/g; null otherwise. */
export function criticalSpeedMs(wheelbaseM: number, understeerDegPerG: number): number | null {
  return understeerDegPerG < 0 ? Math.sqrt((-DEG_PER_RAD * wheelbaseM * STANDARD_GRAVITY_M_PER_S2) / understeerDegPerG) : null;
}

/**
 * Advice for a high-speed balance problem: the usual direction of change in the trade's own terms
 * (common practice in race-car aero set-up), always shown beside the cautions. A problem is only
 * named when the intervals say so: the high band's understeer gradient must differ clearly from the
 * low band's (95 % intervals combined in quadrature, as compareSessions does), or the high-speed
 * CoP must lie wholly ahead of the CoG; and the gradient change must be at least
 * MIN_GRADIENT_CHANGE_DEG_PER_G.
 */
import type { BandSummary, SessionSummary } from "~/engine/summary-types";
import { copPlacement, sideOfZero } from "./verdict";

export type BalanceProblem = "high_speed_understeer" | "high_speed_oversteer" | "cop_ahead_of_cog";

export interface Advice {
  problem: BalanceProblem;
  /** What in the figures shows it. */
  evidence: string;
  /** The usual direction of change. */
  direction: string;
  source: "common practice";
}

/** The cautions shown with any advice (common practice for aero changes on a race car). */
export const ADVICE_CAUTIONS = [
  "These are estimates from logged data, not safety margins.",
  "Change one thing at a time, in small steps, and build speed over installation laps.",
  "Moving the balance forward (under braking and at speed) raises the risk of high-speed oversteer.",
  "The series' technical regulations and qualified engineers decide what goes on the car.",
];

const half = (ci: [number, number]) => (ci[1] - ci[0]) / 2;

/**
 * The smallest change of understeer gradient with speed worth a setup change (deg/g). Our own
 * threshold, not a published one: a stint's intervals can be narrow enough to call a few
 * hundredths of a degree per g "clear", which no driver feels.
 */
export const MIN_GRADIENT_CHANGE_DEG_PER_G = 0.1;

/** The gradient change from the lowest to the highest band that has one, with its 95 % interval. */
export function understeerChangeWithSpeed(bands: BandSummary[]) {
  const withK = bands.filter((b) => b.understeer_gradient_deg_per_g !== null && b.understeer_ci95_deg_per_g !== null);
  if (withK.length < 2) return null;
  const low = withK[0];
  const high = withK[withK.length - 1];
  const change = high.understeer_gradient_deg_per_g! - low.understeer_gradient_deg_per_g!;
  const h = Math.hypot(half(low.understeer_ci95_deg_per_g!), half(high.understeer_ci95_deg_per_g!));
  return { low, high, change, ci95: [change - h, change + h] as [number, number] };
}

const band = (b: BandSummary) => `${b.min_kmh}–${b.max_kmh} km/h`;
const FORWARD = "move the CoP forward: more front aero (splitter, dive planes, front wing) or less rear wing";
const REARWARD = "move the CoP rearward: more rear wing or less front aero";

export function adviceFor(s: Pick<SessionSummary, "bands" | "car" | "cop">): Advice[] {
  const out: Advice[] = [];
  const k = understeerChangeWithSpeed(s.bands);
  if (k) {
    const side = sideOfZero(k.ci95);
    const words = `understeer gradient ${k.low.understeer_gradient_deg_per_g!.toFixed(2)} deg/g at ${band(k.low)}, ${k.high.understeer_gradient_deg_per_g!.toFixed(2)} deg/g at ${band(k.high)}`;
    const large = Math.abs(k.change) >= MIN_GRADIENT_CHANGE_DEG_PER_G;
    if (side === "above" && large) out.push({ problem: "high_speed_understeer", evidence: `The car understeers more at high speed: ${words}.`, direction: `High-speed understeer: ${FORWARD}.`, source: "common practice" });
    if (side === "below" && large) out.push({ problem: "high_speed_oversteer", evidence: `The car understeers less (towards oversteer) at high speed: ${words}.`, direction: `High-speed oversteer: ${REARWARD}.`, source: "common practice" });
  }
  const fast = [...s.bands].reverse().find((b) => b.balance_front_pct !== null);
  if (fast) {
    const place = copPlacement(s.car.wheelbase_mm, s.cop.cog_from_front_axle_mm, fast.balance_front_pct, fast.balance_front_ci95_pct);
    if (place.side === "ahead" && place.behindMm !== null)
      out.push({
        problem: "cop_ahead_of_cog",
        evidence: `At ${band(fast)} the CoP sits ${Math.abs(Math.round(place.behindMm))} mm ahead of the CoG, which makes the car less stable in yaw at speed.`,
        direction: `To steady the car at speed, ${REARWARD}.`,
        source: "common practice",
      });
  }
  return out;
}

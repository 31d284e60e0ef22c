/**
 * The Driver brief's headline in plain words, from the fastest speed band that has a balance: where the aero
 * load's centre of pressure (CoP) sits against the car's centre of gravity (CoG). A CoP clearly ahead of the
 * CoG means the aero loads the front more than the car's weight does, so the front has the larger share of
 * grip at that speed; behind means the rear (common practice). "Clearly" means the whole 95 % interval is on
 * one side (app/lib/report/verdict.ts copPlacement).
 */
import type { SessionSummary } from "~/engine/summary-types";
import { copPlacement } from "./report/verdict";

/** A Brief link works 14 days unless its maker chooses 1–90 (client-safe: the page's form shows them). */
export const BRIEF_DEFAULT_DAYS = 14;
export const BRIEF_MAX_DAYS = 90;

export function briefHeadline(s: Pick<SessionSummary, "bands" | "car" | "cop">): { headline: string; speed: string | null } {
  const fast = [...s.bands].reverse().find((b) => b.balance_front_pct !== null);
  if (!fast) return { headline: "Not enough fast running in this session to say how the car balances at speed.", speed: null };
  const speed = `${Math.round(fast.min_kmh)}–${Math.round(fast.max_kmh)} km/h`;
  const place = copPlacement(s.car.wheelbase_mm, s.cop.cog_from_front_axle_mm, fast.balance_front_pct, fast.balance_front_ci95_pct);
  const ci = place.behindCi95Mm;
  if (ci && ci[0] < 0 && ci[1] < 0) return { headline: "More front grip than rear at high speed", speed };
  if (ci && ci[0] > 0 && ci[1] > 0) return { headline: "More rear grip than front at high speed", speed };
  return { headline: "Front and rear grip about even at high speed (no clear lean either way)", speed };
}

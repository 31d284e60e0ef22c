/**
 * Stage 5 of the summary: understeer. The steering offset (one constant for the stint, from the
 * straights), then per speed band the understeer gradient from the steady-cornering segments the row
 * loop kept (understeer.ts), with the warnings that explain a missing or rough one.
 */
import { roundOrNull as r, roundPair } from "./stats";
import type { ChannelChecks, Warn } from "./summary-checks";
import type { SummaryState } from "./summary-state";
import type { BandSummary } from "./summary-types";
import { bandUndersteer, estimateSteeringOffset } from "./understeer";
import type { SteeringOffset } from "./understeer";

/** Straight-line blocks before the steering offset comes from the straights. */
const MIN_OFFSET_BLOCKS = 5;
/** Seconds of steady cornering in a band before it gets an understeer gradient, and before it is not called rough. */
export const MIN_US_SECONDS = 5;
const FEW_US_SECONDS = 15;
const LARGE_OFFSET_DEG = 3;

export type BandUndersteerRow = Pick<BandSummary, "understeer_gradient_deg_per_g" | "understeer_ci95_deg_per_g" | "understeer_samples" | "understeer_blocks" | "understeer_lat_g_range" | "steady_cornering_s">;

export interface UndersteerStage {
  offset: SteeringOffset;
  bands: BandUndersteerRow[];
}

export function understeerStage(s: SummaryState, checks: ChannelChecks, warn: Warn): UndersteerStage {
  const c = s.model;
  const gates = s.opts.gates;
  const firstBin = Math.round(gates.us_min_lat_g / 0.05);
  const offset = estimateSteeringOffset(s.us, MIN_OFFSET_BLOCKS, c.steeringRatio, firstBin);
  if (offset.source === "corners") warn("steering_offset_from_corners", "too few straight-line samples for the steering offset; it was estimated from corners of both directions instead");
  if (offset.source === "none") warn("steering_offset_unknown", "the steering offset could not be estimated (no straights and corners of one direction only): understeer gradients are not given");
  if (offset.offset_deg !== null && Math.abs(offset.offset_deg) > LARGE_OFFSET_DEG) warn("large_steering_offset", `the steering wheel reads ${offset.offset_deg.toFixed(1)}° on the straights: check the steering sensor's zero (it is removed from the understeer figures)`);
  const rate = Number.isFinite(s.sampleRateHz) && s.sampleRateHz > 0 ? s.sampleRateHz : 1;
  const edges = s.opts.bandEdgesKmh;
  const offRoad = offset.offset_deg === null ? NaN : offset.offset_deg / c.steeringRatio;
  const bands: BandUndersteerRow[] = [];
  for (let b = 0; b < s.bandCount; b++) {
    const label = `${edges[b]}–${edges[b + 1]} km/h`;
    const us = offset.offset_deg === null || checks.understeerBlocked ? null : bandUndersteer(s.us, b, offRoad, gates.us_max_lat_fraction_of_peak);
    const steadyS = us ? us.samples / rate : 0;
    let k = NaN;
    if (us && steadyS >= MIN_US_SECONDS) {
      k = us.k_deg_per_g;
      if (steadyS < FEW_US_SECONDS) warn("few_understeer_samples", `${label}: the understeer gradient rests on ${steadyS.toFixed(1)} s of steady cornering: treat it as rough`);
      if (Math.min(us.left_samples, us.right_samples) < 0.1 * (us.left_samples + us.right_samples)) warn("one_turn_direction", `${label}: steady corners are nearly all one direction, so a steering-offset error goes straight into the understeer gradient`);
    } else if (s.bandRows[b] > 0 && offset.offset_deg !== null && !checks.understeerBlocked) {
      warn("few_understeer_samples", `${label}: only ${steadyS.toFixed(1)} s of steady cornering (|ay| ≥ ${gates.us_min_lat_g} g, steering rate ≤ ${gates.us_max_steer_rate_deg_s}°/s, |ax| ≤ ${gates.us_max_long_g} g on the smoothed channels); at least ${MIN_US_SECONDS} s are needed for an understeer gradient`);
    }
    bands.push({
      understeer_gradient_deg_per_g: r(k, 3),
      understeer_ci95_deg_per_g: Number.isFinite(k) && us ? roundPair(us.ci95_deg_per_g, 3) : null,
      understeer_samples: us ? us.samples : 0,
      understeer_blocks: us ? us.segments : 0,
      understeer_lat_g_range: us ? roundPair([gates.us_min_lat_g, us.upper_gate_g], 3) : null,
      steady_cornering_s: r(Number.isFinite(k) ? steadyS : 0, 2) ?? 0,
    });
  }
  return { offset, bands };
}

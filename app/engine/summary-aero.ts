/**
 * The aero stage of the summary: which aero model the figures rest on (aero-model.ts), and the
 * session's sensitivity of balance and ClA to the front ride height.
 */
import type { AeroFit, AxleFit } from "./aero";
import { fitModel } from "./aero-model";
import type { AeroVariation, ModelFit } from "./aero-model";
import { BAND_BLOCK_STRIDE } from "./aero";
import { interval95, roundOrNull as r, roundPair } from "./stats";
import type { SummaryBuilder } from "./summary";
import type { RideHeightSensitivity } from "./summary-types";

/** Blocks a speed band needs for a ClA of its own (fewer: it shares its neighbour's). */
const MIN_BLOCKS_PER_BAND_CLA = 20;
/** Front ride-height span (mm of block means) before a sensitivity per mm is given. */
const MIN_RIDE_HEIGHT_SPAN_MM = 3;

export const CRITERION_NAME = "BIC on 1 s block means of both axles' loads (lower is better; Schwarz 1978)";

export interface AeroVariationChoice {
  chosen: AeroVariation;
  criterion: string;
  scores: Record<AeroVariation, number | null>;
  models: Partial<Record<AeroVariation, ModelFit>>;
}

/**
 * Fits the three models, keeps the one with the lowest criterion (the simpler one on a tie or when
 * the others cannot be scored), and puts its static load and drift into `fit` (and the headline ClA:
 * the q²-weighted mean of the aero load over q, Σq·(F − a − b·τ)/Σq²).
 */
export function chooseAeroModel(
  s: SummaryBuilder, fit: AeroFit,
  spec: { withIntercept: boolean; withDrift: boolean; knownDrift: { front: number; rear: number } | null },
): AeroVariationChoice {
  const m = s.aero.moments;
  const bandBlocks = Array.from({ length: s.bandCount }, (_, b) => s.aero.bandBlocks[b * BAND_BLOCK_STRIDE]);
  const full = { ...spec, bandBlocks, minBandBlocks: MIN_BLOCKS_PER_BAND_CLA };
  const models: Partial<Record<AeroVariation, ModelFit>> = {};
  const scores: Record<AeroVariation, number | null> = { constant: null, speed_band: null, ride_height: null };
  for (const v of ["constant", "speed_band", "ride_height"] as const) {
    const f = fitModel(m, v, full);
    if (!f) continue;
    models[v] = f;
    scores[v] = r(f.bic ?? NaN, 1);
  }
  let chosen: AeroVariation = "constant";
  for (const v of ["speed_band", "ride_height"] as const) {
    const sc = models[v]?.bic, best = models[chosen]?.bic;
    if (sc !== null && sc !== undefined && (best === null || best === undefined || sc < best)) chosen = v;
  }
  const model = models[chosen];
  if (chosen !== "constant" && model) {
    const sums = s.aero.samples;
    for (const side of ["front", "rear"] as const) {
      const ax: AxleFit = fit[side], mx = model[side];
      const sqy = side === "front" ? sums.sqf : sums.sqr;
      const cla = (sqy - mx.intercept_n * sums.sq - mx.drift_n_per_s * sums.stq) / sums.sqq;
      const shift = cla - ax.cla_m2;
      ax.cla_m2 = cla;
      if (ax.cla_ci95_m2) ax.cla_ci95_m2 = [ax.cla_ci95_m2[0] + shift, ax.cla_ci95_m2[1] + shift];
      ax.intercept_n = mx.intercept_n;
      ax.drift_n_per_s = mx.drift_n_per_s;
      ax.offset_cov = mx.offset_cov;
    }
  }
  return { chosen, criterion: CRITERION_NAME, scores, models };
}

/**
 * Balance and total ClA per mm of front ride-height change, from the ride-height model's slopes
 * (c1 per axle) at the headline ClA: d(balance)/dh = 100·(c1_f·ClA_r − ClA_f·c1_r)/ClA_total².
 * Null when the model could not be fitted or the data span less than 3 mm of front ride height.
 */
export function rideHeightSensitivity(s: SummaryBuilder, choice: AeroVariationChoice, fit: AeroFit): RideHeightSensitivity | null {
  const model = choice.models.ride_height;
  const m = s.aero.moments;
  if (!model || !(m.hMax - m.hMin >= MIN_RIDE_HEIGHT_SPAN_MM)) return null; // suspension travel, tyre left out: the stricter reading
  const cf = fit.front.cla_m2, cr = fit.rear.cla_m2, ct = cf + cr;
  if (!(ct > 0)) return null;
  // The dampers see the suspension's share of the ride-height change; the tyre (in series) adds
  // Kw/Kt of it again: ride height = suspension travel·(1 + Kw/Kt).
  const c = s.model;
  const tyre = 1 + (c.forcePerMmFront * c.motionRatioFront) / s.opts.tyreRateNPerMm;
  const c1f = model.front.beta[1] / tyre, c1r = model.rear.beta[1] / tyre;
  const vf = model.front.cov[3] / (tyre * tyre), vr = model.rear.cov[3] / (tyre * tyre);
  const df = Math.max(1, m.blockCount - model.parameters / 2);
  const bal = (100 * (c1f * cr - cf * c1r)) / (ct * ct);
  const balSe = (100 * Math.sqrt(cr * cr * vf + cf * cf * vr)) / (ct * ct);
  const tot = c1f + c1r, totSe = Math.sqrt(vf + vr);
  return {
    front_ride_height_span_mm: [r(m.hMin * tyre, 2)!, r(m.hMax * tyre, 2)!],
    balance_pct_per_mm: r(bal, 4)!,
    balance_ci95_pct_per_mm: roundPair(interval95(bal, balSe, df), 4),
    cla_total_m2_per_mm: r(tot, 5)!,
    cla_total_ci95_m2_per_mm: roundPair(interval95(tot, totSe, df), 5),
  };
}

/**
 * Band aero loads pooled with the chosen aero model (app/engine/README.md §2, "Band loads").
 *
 * A band's mean measured load (less static load and drift) is unbiased but noisy: in a slow band the
 * aero load is a few hundred newtons and road input at the wheels moves its mean by several. The
 * chosen model (one ClA, or ClA linear in ride height), fitted on the whole stint, predicts the same mean with
 * far less noise, but only as well as the model fits. Each band therefore takes the model's
 * prediction plus its own residual (band mean − prediction) shrunk by the empirical-Bayes factor
 * λ = τ²/(τ² + v): v is the residual's sampling variance (from the band's 1 s block means), τ² the
 * model's misfit at that band, estimated by the method of moments of DerSimonian & Laird
 * (Controlled Clinical Trials 7, 1986, from memory) with the centre fixed at the model (the residuals
 * of a right model average zero) and each band taken on its own, τ² = max(0, r² − v): a misfit
 * pooled over all bands would hide one that only the slow band shows (its aero load is small, so
 * what is a few newtons there is points of balance). A residual well above its noise keeps λ near 1
 * (the band's own mean); one within the noise is pooled. Efron & Morris (JASA 70, 1975) on why such
 * shrinkage beats the separate means (from memory).
 */
import type { ModelFit } from "./aero-model";
import type { BandAeroSums } from "./aero";

export interface BandPoolInput {
  /** The band's mean load less static load and drift (N), its block-mean sampling variance (N²) and blocks. */
  load: number;
  variance: number;
  blocks: number;
}

export interface PooledBand {
  load: number;
  /** Variance of the pooled load from sampling and model (N²), without the static load's own. */
  variance: number;
  /** Weight of the band's own residual (1 = the band's mean as measured). */
  lambda: number;
  prediction: number;
}

/** Blocks a band needs for its residual to count in the misfit variance. */
const MIN_POOL_BLOCKS = 5;

/** The model's mean aero load over a band's samples (N) and the regressor means it rests on; null when the model gives none. */
export function bandPrediction(model: ModelFit, side: "front" | "rear", a: BandAeroSums, b: number): { load: number; x: number[] } | null {
  const n = a.n[b];
  if (!(n > 0)) return null;
  const beta = model[side].beta;
  const q = a.sq[b] / n;
  if (model.variation === "constant") return { load: beta[0] * q, x: [q] };
  // q·ĥ = π0·q + πτ·τq + πq·q² + πax·q·ax + πqq·q³ (the first stages of aero-model.ts), over the band.
  const qh = (p: number[]) => p[0] * q + (p[1] * a.stq[b] + p[2] * a.sqq[b] + p[3] * a.sqax[b] + p[4] * a.sqqq[b]) / n;
  if (model.variation === "ride_height" && model.firstStage) {
    const x = [q, qh(model.firstStage)];
    return { load: beta[0] * x[0] + beta[1] * x[1], x };
  }
  if (model.variation === "ride_height_front_rear" && model.firstStage && model.firstStageRear) {
    const x = [q, qh(model.firstStage), qh(model.firstStageRear)];
    return { load: beta[0] * x[0] + beta[1] * x[1] + beta[2] * x[2], x };
  }
  return null;
}

function quadForm(cov: number[], x: number[]): number {
  const k = x.length;
  let v = 0;
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) v += x[i] * cov[i * k + j] * x[j];
  return Number.isFinite(v) ? Math.max(0, v) : 0;
}

/**
 * Pooled loads of one axle over all bands (null entries where a band has no load). Bands without
 * a usable prediction or spread keep their own mean (λ = 1).
 */
export function poolBands(model: ModelFit | undefined, side: "front" | "rear", a: BandAeroSums, input: (BandPoolInput | null)[]): (PooledBand | null)[] {
  const pred = input.map((x, b) => (x && model ? bandPrediction(model, side, a, b) : null));
  return input.map((x, b) => {
    if (!x) return null;
    const p = pred[b];
    if (!p || !model || x.blocks < MIN_POOL_BLOCKS || !(x.variance > 0)) return { load: x.load, variance: x.variance, lambda: 1, prediction: p ? p.load : NaN };
    // The band's own misfit: τ² = max(0, r² − v) (the moment estimator on this band alone).
    const r = x.load - p.load, v = x.variance;
    const tau2 = Math.max(0, r * r - v);
    const lambda = tau2 / (tau2 + v);
    const predVar = quadForm(model[side].cov, p.x);
    return { load: p.load + lambda * (x.load - p.load), variance: lambda * x.variance + (1 - lambda) ** 2 * predVar, lambda, prediction: p.load };
  });
}

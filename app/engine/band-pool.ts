/**
 * Band aero loads pooled with the chosen aero model (app/engine/README.md §2, "Band loads").
 *
 * A band's mean measured load (less static load and drift) is unbiased but noisy: in a slow band the
 * aero load is a few hundred newtons and road input at the wheels moves its mean by several. The
 * chosen model (one ClA, or ClA linear in ride height), fitted on the whole stint, predicts the same mean with
 * far less noise, but only as well as the model fits. Each band therefore takes the model's
 * prediction plus its own residuals (band mean − prediction, both axles) shrunk by the
 * empirical-Bayes factor λ = τ²/(1 + τ²): τ² is the model's misfit between bands in units of each
 * band's residual sampling covariance Σ (from its 1 s block means, about their line in q), estimated
 * by the method of moments of DerSimonian & Laird (Controlled Clinical Trials 7, 1986, from memory)
 * with the centre fixed at the model (the residuals of a right model average zero). Residuals well
 * above their noise give λ near 1 (the bands' own means); residuals within it are pooled. Both axles
 * are judged together against Σ because road input and heave move both axles' means at once.
 * Efron & Morris (JASA 70, 1975) on why such shrinkage beats the separate means (from memory).
 * What it cannot see: a misfit in one band alone while the others agree with the model is partly
 * pooled away; the interval carries that move (below).
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
  /** Variance of the pooled load for its interval (N²): sampling, model, and the pooling's own move; without the static load's. */
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

/** One band's pooled loads on both axles, with the common weight of its own residual. */
export interface PooledPair {
  front: PooledBand;
  rear: PooledBand;
  lambda: number;
  /** Covariance of the two pooled loads for the balance's interval (N²). */
  cov: number;
}

/** A band's residuals against the model and their Mahalanobis size z² = rᵀΣ⁻¹r; null when it cannot count. */
function residual(model: ModelFit, a: BandAeroSums, b: number, x: BandPair): { pf: { load: number; x: number[] }; pr: { load: number; x: number[] }; rf: number; rr: number; z2: number } | null {
  const pf = bandPrediction(model, "front", a, b), pr = bandPrediction(model, "rear", a, b);
  const vf = x.front.variance, vr = x.rear.variance, c = x.cov, det = vf * vr - c * c;
  if (!pf || !pr || x.front.blocks < MIN_POOL_BLOCKS || !(vf > 0) || !(vr > 0) || !(det > 0)) return null;
  const rf = x.front.load - pf.load, rr = x.rear.load - pr.load;
  return { pf, pr, rf, rr, z2: (rf * rf * vr - 2 * rf * rr * c + rr * rr * vf) / det };
}

export interface BandPair { front: BandPoolInput; rear: BandPoolInput; cov: number }

/**
 * Pooled loads of both axles over all bands (null where a band has no load). Each band's residuals
 * r = (r_f, r_r) are sized against their sampling covariance Σ (block means; road input and heave
 * move both axles at once): z² = rᵀΣ⁻¹r has mean 2(1 + τ²) when the model's misfit has covariance
 * τ²Σ, so over the k bands that count τ² = max(0, Σz²/(2k) − 1), and every band takes the weight
 * λ = τ²/(1 + τ²) of its own residual. Bands without a usable prediction or spread keep their own
 * means (λ = 1).
 */
export function poolBands(model: ModelFit | undefined, a: BandAeroSums, input: (BandPair | null)[]): (PooledPair | null)[] {
  const res = input.map((x, b) => (x && model ? residual(model, a, b, x) : null));
  let zs = 0, k = 0;
  for (const r of res) if (r) { zs += r.z2; k++; }
  const tau2 = k > 0 ? Math.max(0, zs / (2 * k) - 1) : Infinity;
  const lambda = Number.isFinite(tau2) ? tau2 / (1 + tau2) : 1;
  return input.map((x, b) => {
    if (!x) return null;
    const r = res[b];
    if (!r || !model) {
      const pf = model ? bandPrediction(model, "front", a, b) : null, pr = model ? bandPrediction(model, "rear", a, b) : null;
      return { front: { ...x.front, lambda: 1, prediction: pf ? pf.load : NaN }, rear: { ...x.rear, lambda: 1, prediction: pr ? pr.load : NaN }, lambda: 1, cov: x.cov };
    }
    // The interval's variance with τ² estimated, not known (Morris, JASA 78, 1983, from memory), for
    // shrinkage B = 1 − λ over k residuals: v·(1 − B·(k − 2)/k) + (2/(k − 2))·B²·r², plus B² times the
    // prediction's own variance. The r² term also keeps some of what pooling moved the band from its
    // own mean in the interval (a misfit in one band alone hides in the pooled τ²).
    const B = 1 - lambda, kk = Math.max(3, 2 * k), morris = 2 / (kk - 2);
    const pooled = (p: { load: number; x: number[] }, res: number, v: number, side: "front" | "rear"): PooledBand => ({
      load: p.load + lambda * res,
      variance: v * (1 - (B * (kk - 2)) / kk) + morris * B * B * res * res + B * B * quadForm(model[side].cov, p.x),
      lambda,
      prediction: p.load,
    });
    return { front: pooled(r.pf, r.rf, x.front.variance, "front"), rear: pooled(r.pr, r.rr, x.rear.variance, "rear"), lambda, cov: x.cov * (1 - (B * (kk - 2)) / kk) + morris * B * B * r.rf * r.rr };
  });
}

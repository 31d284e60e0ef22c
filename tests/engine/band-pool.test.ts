import { describe, expect, it } from "vitest";
import type { BandAeroSums } from "~/engine/aero";
import { createBandAeroSums } from "~/engine/aero";
import type { ModelFit } from "~/engine/aero-model";
import { bandPrediction, poolBands } from "~/engine/band-pool";

// Empirical-Bayes pooling of the bands' means with a model's prediction: z² = rᵀΣ⁻¹r per band,
// τ² = max(0, Σz²/(2k) − 1) over the k bands (the method of moments of DerSimonian & Laird,
// Controlled Clinical Trials 7, 1986, with the centre fixed at the model; from memory), λ = τ²/(1 + τ²).
// Expected values below are computed by us from those formulas.
function model(variation: "constant" | "ride_height", beta: number[], firstStage?: number[]): ModelFit {
  const axle = { intercept_n: 0, drift_n_per_s: 0, offset_cov: { aa: 0, bb: 0, ab: 0 }, beta, cov: beta.flatMap(() => beta.map(() => 0)), rss: 1 };
  return { variation, front: axle, rear: axle, parameters: 2 * beta.length, bic: 0, firstStage };
}

function sums(q: number[]): BandAeroSums {
  const a = createBandAeroSums(q.length);
  q.forEach((qq, b) => { a.n[b] = 100; a.sq[b] = 100 * qq; a.sqq[b] = 100 * qq * qq; });
  return a;
}

const band = (f: number, r: number, v = 16, cov = 0, blocks = 30) => ({ front: { load: f, variance: v, blocks }, rear: { load: r, variance: v, blocks }, cov });

describe("band loads pooled with the aero model", () => {
  it("residuals within their noise take the model's prediction", () => {
    const m = model("constant", [0.5]);
    // Prediction ClA·q̄ = 200 N and 500 N on both axles; residuals of 2–3 N against σ = 4 N: Σz² = (4 + 9 + 9 + 4)/16 = 1.625 < 2k = 4.
    const out = poolBands(m, sums([400, 1000]), [band(202, 197), band(503, 498)]);
    expect(out[0]!.lambda).toBe(0);
    expect(out[0]!.front.load).toBeCloseTo(200, 9);
    expect(out[1]!.rear.load).toBeCloseTo(500, 9);
  });

  it("residuals far above their noise keep (most of) the bands' own means", () => {
    const m = model("constant", [0.5]);
    // r = 40 N on every axle of both bands, σ² = 16: Σz² = 4·100 = 400, τ² = 400/4 − 1 = 99, λ = 0.99.
    const out = poolBands(m, sums([400, 1000]), [band(240, 240), band(540, 540)]);
    expect(out[0]!.lambda).toBeCloseTo(0.99, 9);
    expect(out[0]!.front.load).toBeCloseTo(200 + 0.99 * 40, 9);
    // Interval variance (Morris 1983, k = 4 residuals, B = 1 − λ = 0.01): v·(1 − B·(k − 2)/k) + (2/(k − 2))·B²·r²
    // = 16·(1 − 0.005) + 1·0.0001·1600 = 15.92 + 0.16 = 16.08 (computed by us).
    expect(out[0]!.front.variance).toBeCloseTo(16.08, 9);
  });

  it("judges both axles against their covariance: a shift common to both is expected when they move together", () => {
    const m = model("constant", [0.5]);
    // r = (6, 6), σ² = 16 each. Independent: z² = 72/16 = 4.5 per band; correlation 0.9 (cov 14.4):
    // z² = (36·16 − 2·36·14.4 + 36·16)/(256 − 207.36) = 115.2/48.64 ≈ 2.37 (computed by us).
    const free = poolBands(m, sums([400, 1000]), [band(206, 206), band(506, 506)]);
    const tied = poolBands(m, sums([400, 1000]), [band(206, 206, 16, 14.4), band(506, 506, 16, 14.4)]);
    expect(free[0]!.lambda).toBeCloseTo(1.25 / 2.25, 9);
    expect(tied[0]!.lambda).toBeCloseTo(Math.max(0, 115.2 / 48.64 / 2 - 1) / (115.2 / 48.64 / 2), 9);
    expect(tied[0]!.lambda).toBeLessThan(free[0]!.lambda);
  });

  it("bands with too few blocks, or without a model, keep their own means", () => {
    const m = model("constant", [0.5]);
    expect(poolBands(m, sums([400]), [band(230, 210, 16, 0, 3)])[0]!.front.load).toBe(230);
    expect(poolBands(undefined, sums([400]), [band(230, 210)])[0]!.rear.load).toBe(210);
  });

  it("the ride-height model predicts (c0 + c1·ĥ)·q over the band with ĥ from its first stage", () => {
    // ĥ = π0 + πτ·τ + πq·q + πax·ax + πqq·q²; with only πq ≠ 0, mean q·ĥ = πq·mean q².
    const m = model("ride_height", [0.4, 0.01], [0, 0, -0.005, 0, 0]);
    const p = bandPrediction(m, "front", sums([500]), 0)!;
    expect(p.load).toBeCloseTo(0.4 * 500 + 0.01 * -0.005 * 500 * 500, 9);
  });
});

import { describe, expect, it } from "vitest";
import type { BandAeroSums } from "~/engine/aero";
import { createBandAeroSums } from "~/engine/aero";
import type { ModelFit } from "~/engine/aero-model";
import { bandPrediction, poolBands } from "~/engine/band-pool";

// Empirical-Bayes pooling of a band's mean with a model's prediction: λ = τ²/(τ² + v) with the
// band's own moment estimate τ² = max(0, r² − v) (DerSimonian & Laird, Controlled Clinical Trials 7,
// 1986, method of moments, from memory). Expected values below are computed by us from that formula.
function model(variation: "constant" | "ride_height", beta: number[], firstStage?: number[]): ModelFit {
  const axle = { intercept_n: 0, drift_n_per_s: 0, offset_cov: { aa: 0, bb: 0, ab: 0 }, beta, cov: beta.flatMap(() => beta.map(() => 0)), rss: 1 };
  return { variation, front: axle, rear: axle, parameters: 2 * beta.length, bic: 0, firstStage };
}

function sums(q: number[], extra?: Partial<Record<keyof BandAeroSums, number[]>>): BandAeroSums {
  const a = createBandAeroSums(q.length);
  q.forEach((qq, b) => { a.n[b] = 100; a.sq[b] = 100 * qq; a.sqq[b] = 100 * qq * qq; });
  for (const [k, v] of Object.entries(extra ?? {})) v!.forEach((x, b) => (a[k as keyof BandAeroSums][b] = x));
  return a;
}

describe("band loads pooled with the aero model", () => {
  it("a residual within its noise takes the model's prediction; one far above it keeps the band's own mean", () => {
    const m = model("constant", [0.5]);
    const a = sums([400, 1000]);
    // Prediction ClA·q̄ = 200 N and 500 N.
    const [slow, fast] = poolBands(m, "front", a, [{ load: 203, variance: 16, blocks: 30 }, { load: 540, variance: 16, blocks: 30 }]);
    // r = 3 N, v = 16 N²: r² < v, so τ² = 0 and λ = 0.
    expect(slow!.lambda).toBe(0);
    expect(slow!.load).toBeCloseTo(200, 9);
    // r = 40 N: τ² = 1600 − 16 = 1584, λ = 1584/1600 = 0.99 (computed by us).
    expect(fast!.lambda).toBeCloseTo(0.99, 9);
    expect(fast!.load).toBeCloseTo(500 + 0.99 * 40, 9);
    // The pooled variance never exceeds the band's own when the model's prediction is exact.
    expect(fast!.variance).toBeLessThanOrEqual(16);
  });

  it("bands with too few blocks, or without a model, keep their own mean", () => {
    const m = model("constant", [0.5]);
    const a = sums([400]);
    expect(poolBands(m, "front", a, [{ load: 230, variance: 16, blocks: 3 }])[0]!.load).toBe(230);
    expect(poolBands(undefined, "front", a, [{ load: 230, variance: 16, blocks: 30 }])[0]!.load).toBe(230);
  });

  it("the ride-height model predicts (c0 + c1·ĥ)·q over the band with ĥ from its first stage", () => {
    // ĥ = π0 + πτ·τ + πq·q + πax·ax + πqq·q²; with only πq ≠ 0, mean q·ĥ = πq·mean q².
    const m = model("ride_height", [0.4, 0.01], [0, 0, -0.005, 0, 0]);
    const a = sums([500]);
    const p = bandPrediction(m, "front", a, 0)!;
    expect(p.load).toBeCloseTo(0.4 * 500 + 0.01 * -0.005 * 500 * 500, 9);
  });
});

import { describe, expect, it } from "vitest";
import { BlockSmoother } from "~/engine/filters";

/**
 * Centred moving average straight from its definition: the mean of the valid samples in
 * x[i−h … i+h] (NaN = dropout, left out), NaN when fewer than h+1 are valid. Common practice
 * (boxcar / moving-average filter, DSP textbooks); the h+1 rule is the engine's documented choice.
 */
function centredMean(x: Float64Array, h: number): number[] {
  return Array.from(x, (_, i) => {
    let s = 0, n = 0;
    for (let k = i - h; k <= i + h; k++) if (k >= 0 && k < x.length && x[k] === x[k]) { s += x[k]; n++; }
    return n >= h + 1 ? s / n : NaN;
  });
}

/** Feeds three channels (one of them unlogged in every other block) and collects every output. */
function run(cols: (Float64Array | null)[], half: number[], needSlope: boolean[], dt: number, blockRows: number, dropEvery: number) {
  const sm = new BlockSmoother(half, dt, needSlope);
  const n = cols.find((c) => c)!.length;
  const out = half.map(() => ({ mean: [] as number[], slope: [] as number[], centre: [] as number[] }));
  const take = (count: number) => {
    // The outputs are read right after each call, before the next one (their documented lifetime).
    for (let k = 0; k < half.length; k++)
      for (let j = 0; j < count; j++) { out[k].mean.push(sm.mean[k][j]); out[k].slope.push(sm.slope[k][j]); out[k].centre.push(sm.centre[k][j]); }
  };
  for (let r = 0, b = 0; r < n; r += blockRows, b++) {
    const rows = Math.min(blockRows, n - r);
    take(sm.push(cols.map((c, k) => (c === null || (k === 2 && dropEvery > 0 && b % dropEvery === 1) ? null : c.subarray(r, r + rows))), rows));
  }
  take(sm.flush());
  return out;
}

describe("block smoother with several channels", () => {
  const dt = 0.01;
  const n = 3000;
  const t = Float64Array.from({ length: n }, (_, i) => i * dt);
  // A noisy signal with dropouts and a straight ramp (a linear trend passes a symmetric FIR unchanged).
  const noisy = Float64Array.from({ length: n }, (_, i) => 30 + 5 * Math.sin(i / 37) + ((i * 7919) % 101) / 50 - 1 + (i % 211 === 5 ? NaN : 0));
  const ramp = Float64Array.from({ length: n }, (_, i) => -4 + 1.5 * i * dt);

  it("matches the centred-average definition for every block size, with unused slopes left NaN", () => {
    for (const blockRows of [1, 7, 64, 2048, 5000]) {
      const out = run([t, noisy, ramp], [0, 6, 10], [false, false, true], dt, blockRows, 0);
      const ref = centredMean(noisy, 6);
      expect(out[1].mean).toHaveLength(n);
      ref.forEach((v, i) => (Number.isNaN(v) ? expect(out[1].mean[i]).toBeNaN() : expect(out[1].mean[i]).toBeCloseTo(v, 9)));
      // Half window 0: no filtering, the raw time comes back unchanged (identity filter).
      t.forEach((v, i) => { expect(out[0].mean[i]).toBe(v); expect(out[0].centre[i]).toBe(v); });
      // Centre is the raw sample of the output row, dropouts included.
      noisy.forEach((v, i) => (Number.isNaN(v) ? expect(out[1].centre[i]).toBeNaN() : expect(out[1].centre[i]).toBe(v)));
      expect(out[1].slope.every(Number.isNaN)).toBe(true);
      expect(out[0].slope.every(Number.isNaN)).toBe(true);
      // Slope of a straight line = its gradient, 1.5 per second (common practice: symmetric difference of means).
      for (let i = 10; i < n - 10; i++) expect(out[2].slope[i]).toBeCloseTo(1.5, 9);
    }
  });

  it("gives NaN for the blocks where a channel is not logged and correct values elsewhere", () => {
    const out = run([t, noisy, ramp], [0, 6, 10], [false, false, true], dt, 500, 2);
    // Blocks 1, 3, 5 (rows 500–999, 1500–1999, 2500–2999) have no ramp column: NaN there; the other
    // blocks keep the straight line's value (the filter is zero-phase) away from the gaps' edges.
    for (let i = 0; i < n; i++) {
      const block = Math.floor(i / 500);
      const edge = i % 500 < 20 || i % 500 >= 480;
      if (block % 2 === 1 && !edge) expect(out[2].centre[i]).toBeNaN();
      if (block % 2 === 0 && !edge && i > 20) expect(out[2].mean[i]).toBeCloseTo(ramp[i], 9);
    }
    // The other channels do not notice.
    const ref = centredMean(noisy, 6);
    ref.forEach((v, i) => (Number.isNaN(v) ? expect(out[1].mean[i]).toBeNaN() : expect(out[1].mean[i]).toBeCloseTo(v, 9)));
  });
});

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { BlockSmoother } from "~/engine/filters";
import { TraceDecimator } from "~/engine/summary-traces";

function runSmoother(x: Float64Array, half: number[], dt: number, blockRows: number) {
  const sm = new BlockSmoother(half, dt);
  const mean: number[] = [], slope: number[] = [], centre: number[] = [];
  const take = (n: number) => { for (let j = 0; j < n; j++) { mean.push(sm.mean[0][j]); slope.push(sm.slope[0][j]); centre.push(sm.centre[0][j]); } };
  for (let r = 0; r < x.length; r += blockRows) take(sm.push([x.subarray(r, Math.min(x.length, r + blockRows))], Math.min(blockRows, x.length - r)));
  take(sm.flush());
  return { mean, slope, centre };
}

describe("centred moving average (zero-phase boxcar)", () => {
  it("passes a straight line unchanged and returns its slope", () => {
    // Any symmetric FIR filter keeps a linear trend and has zero phase (common practice, DSP).
    const dt = 0.01;
    const x = Float64Array.from({ length: 1000 }, (_, i) => 3 + 2.5 * i * dt);
    const { mean, slope } = runSmoother(x, [5], dt, 128);
    expect(mean).toHaveLength(1000);
    for (let i = 10; i < 990; i++) {
      expect(mean[i]).toBeCloseTo(x[i], 9);
      expect(slope[i]).toBeCloseTo(2.5, 9);
    }
  });

  it("attenuates a sine by the boxcar gain sin(πfN/fs)/(N·sin(πf/fs)) without delaying it", () => {
    // Frequency response of an N-point moving average (common practice, DSP textbooks).
    const fs = 100, f = 3, n = 11, dt = 1 / fs;
    const x = Float64Array.from({ length: 2000 }, (_, i) => Math.sin(2 * Math.PI * f * i * dt));
    const { mean } = runSmoother(x, [(n - 1) / 2], dt, 333);
    const gain = Math.sin((Math.PI * f * n) / fs) / (n * Math.sin((Math.PI * f) / fs));
    for (let i = 100; i < 1900; i++) expect(mean[i]).toBeCloseTo(gain * x[i], 9);
  });

  it("gives the same output for any block size, and leaves dropouts out instead of reading them as zero", () => {
    // Common practice: streaming results must not depend on chunking; NaN = dropout (DEVELOPERS.md).
    const x = Float64Array.from({ length: 777 }, (_, i) => 20 + Math.sin(i / 9) + (i % 13 === 0 ? NaN : 0));
    const a = runSmoother(x, [4], 0.02, 1);
    const b = runSmoother(x, [4], 0.02, 500);
    for (const key of ["mean", "slope", "centre"] as const) {
      expect(b[key]).toHaveLength(a[key].length);
      a[key].forEach((v, i) => (Number.isNaN(v) ? expect(b[key][i]).toBeNaN() : expect(b[key][i]).toBeCloseTo(v, 9)));
    }
    for (let i = 5; i < 770; i++) expect(a.mean[i]).toBeGreaterThan(18);
  });
});

describe("centred moving average restarting at time blocks (analysis in parts)", () => {
  // A log analysed in parts must smooth each sample exactly as the whole-log run, or a sample on a
  // gate's edge could fall the other way (common practice for reproducible streaming results).
  const dt = 0.01;
  const t = Float64Array.from({ length: 3000 }, (_, i) => 1000 + i * dt);
  const x = Float64Array.from({ length: 3000 }, (_, i) => 20 + Math.sin(i / 7) + 0.37 * Math.cos(i * 1.3) + (i % 97 === 0 ? NaN : 0));
  function run(from: number, blockRows: number, t0: number) {
    const sm = new BlockSmoother([0, 6], dt, [false, true], 64, { channel: 0, periodS: 1, t0 });
    const mean: number[] = [], slope: number[] = [];
    const take = (n: number) => { for (let j = 0; j < n; j++) { mean.push(sm.mean[1][j]); slope.push(sm.slope[1][j]); } };
    for (let r = from; r < t.length; r += blockRows) {
      const n = Math.min(blockRows, t.length - r);
      take(sm.push([t.subarray(r, r + n), x.subarray(r, r + n)], n));
    }
    take(sm.flush());
    return { mean, slope, exactFrom: sm.exactFrom };
  }
  it("gives bit-identical outputs for any block size, and from the first restart of a run that starts mid-log", () => {
    const whole = run(0, 3000, NaN);
    for (const blockRows of [1, 7, 100, 1024]) {
      const b = run(0, blockRows, NaN);
      expect(b.mean).toEqual(whole.mean);
      expect(b.slope).toEqual(whole.slope);
    }
    // A run from row 1234 (a part's lead-in) with the log's t0: exact from its first full-window restart on.
    const part = run(1234, 333, 1000);
    expect(part.exactFrom).toBeGreaterThanOrEqual(6);
    const first = 1234 + part.exactFrom;
    expect(first).toBe(1300); // the next whole second of the log's clock (t − t0 = 13 s)
    expect(part.mean.slice(part.exactFrom)).toEqual(whole.mean.slice(first));
    expect(part.slope.slice(part.exactFrom)).toEqual(whole.slope.slice(first));
  });
});

describe("centred moving average against its definition (property)", () => {
  it("equals the mean of the valid samples in the window, bit for bit the same for any block size", () => {
    // Definition: the mean of the valid samples among x[i−h … i+h], NaN when fewer than h + 1 are
    // valid (DEVELOPERS.md: NaN = dropout). The fast loop and the dropout-counting loop must agree.
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 6 }), fc.integer({ min: 1, max: 60 }), fc.double({ min: 0, max: 0.15, noNaN: true }),
        fc.array(fc.double({ min: -50, max: 50, noNaN: true }), { minLength: 120, maxLength: 400 }), fc.integer({ min: 0, max: 1e6 }),
        (h, block, nanShare, values, seed) => {
          const n = values.length, dt = 0.01;
          const t = Float64Array.from({ length: n }, (_, i) => i * dt);
          let r = seed;
          const x = Float64Array.from(values, (v) => ((r = (r * 1103515245 + 12345) % 2147483648) / 2147483648 < nanShare ? NaN : v));
          const run = (rowsPerBlock: number) => {
            const sm = new BlockSmoother([0, h], dt, [false, true], 64, { channel: 0, periodS: 0.37, t0: NaN });
            const out: number[] = [];
            const take = (k: number) => { for (let j = 0; j < k; j++) out.push(sm.mean[1][j]); };
            for (let i = 0; i < n; i += rowsPerBlock) { const m = Math.min(rowsPerBlock, n - i); take(sm.push([t.subarray(i, i + m), x.subarray(i, i + m)], m)); }
            take(sm.flush());
            return out;
          };
          const a = run(n), b = run(block);
          for (let i = 0; i < n; i++) {
            let sum = 0, count = 0;
            for (let j = Math.max(0, i - h); j <= Math.min(n - 1, i + h); j++) if (x[j] === x[j]) { sum += x[j]; count++; }
            if (count < h + 1) expect(a[i]).toBeNaN();
            else expect(Math.abs(a[i] - sum / count)).toBeLessThan(1e-9 * (1 + Math.abs(sum / count)));
            expect(Object.is(a[i], b[i])).toBe(true);
          }
        },
      ),
      { numRuns: 80, seed: 20261203 },
    );
  });
});

describe("trace decimation", () => {
  it("keeps min and max of every bucket while the bucket width doubles", () => {
    // Min/max decimation keeps one-sample peaks visible in a chart (common practice for plots).
    const d = new TraceDecimator(["x"], 64);
    const n = 10_000;
    const t = Float64Array.from({ length: n }, (_, i) => i * 0.01);
    const x = Float64Array.from({ length: n }, (_, i) => Math.sin(i / 100));
    x[4321] = 9;
    x[8765] = -9;
    d.pushColumns(t, [x], 5000);
    d.pushColumns(t.subarray(5000), [x.subarray(5000)], 5000);
    const out = d.output({ x: 3 });
    expect(out.t_s.length).toBeLessThanOrEqual(64);
    expect(Math.max(...out.channels.x.max.map((v) => v ?? -Infinity))).toBe(9);
    expect(Math.min(...out.channels.x.min.map((v) => v ?? Infinity))).toBe(-9);
    expect(out.bucket_rows * out.t_s.length).toBeGreaterThanOrEqual(n);
  });
});

/**
 * Decimated traces for charts. The log's length is unknown while streaming, so each bucket starts
 * one row wide; when all buckets are full, neighbours merge pairwise and the width doubles.
 * Every bucket keeps the min and max of each channel (spikes survive decimation) and its first time.
 */
export interface TraceOutput {
  bucket_rows: number;
  t_s: number[];
  channels: Record<string, { min: (number | null)[]; max: (number | null)[] }>;
}

export class TraceDecimator {
  readonly names: readonly string[];
  private readonly cap: number;
  private readonly t0: Float64Array;
  private readonly lo: Float64Array;
  private readonly hi: Float64Array;
  private buckets = 0;
  private inBucket = 0;
  private width = 1;

  /** `maxBuckets` is rounded up to an even number. */
  constructor(names: readonly string[], maxBuckets = 2048) {
    this.names = names;
    this.cap = Math.max(2, maxBuckets + (maxBuckets & 1));
    const c = names.length;
    this.t0 = new Float64Array(this.cap);
    this.lo = new Float64Array(this.cap * c);
    this.hi = new Float64Array(this.cap * c);
  }

  /**
   * Add `count` rows column by column (tight loops; no per-row calls). `cols[k]` null = channel not
   * logged; `scale[k]` (> 0) converts to the output unit, applied at output time.
   */
  pushColumns(t: Float64Array, cols: ReadonlyArray<Float64Array | null>, count: number): void {
    const c = this.names.length;
    let j = 0;
    while (j < count) {
      const b = this.buckets;
      const o = b * c;
      if (this.inBucket === 0) {
        this.t0[b] = t[j];
        for (let k = 0; k < c; k++) { this.lo[o + k] = Infinity; this.hi[o + k] = -Infinity; }
      }
      const take = Math.min(this.width - this.inBucket, count - j);
      const end = j + take;
      for (let k = 0; k < c; k++) {
        const col = cols[k];
        if (col === null) continue;
        // Two rows per step: half the loop overhead, and two independent min/max chains.
        let lo = this.lo[o + k], hi = this.hi[o + k], lo2 = lo, hi2 = hi;
        let i = j;
        for (; i + 1 < end; i += 2) {
          const v = col[i], w = col[i + 1];
          if (v < lo) lo = v;
          if (v > hi) hi = v;
          if (w < lo2) lo2 = w;
          if (w > hi2) hi2 = w;
        }
        if (i < end) {
          const v = col[i];
          if (v < lo) lo = v;
          if (v > hi) hi = v;
        }
        this.lo[o + k] = lo2 < lo ? lo2 : lo;
        this.hi[o + k] = hi2 > hi ? hi2 : hi;
      }
      this.inBucket += take;
      j = end;
      if (this.inBucket === this.width) {
        this.inBucket = 0;
        if (++this.buckets === this.cap) this.merge();
      }
    }
  }

  private merge(): void {
    const c = this.names.length;
    const half = this.cap / 2;
    for (let i = 0; i < half; i++) {
      this.t0[i] = this.t0[2 * i];
      for (let k = 0; k < c; k++) {
        const a = 2 * i * c + k, b = (2 * i + 1) * c + k;
        this.lo[i * c + k] = Math.min(this.lo[a], this.lo[b]);
        this.hi[i * c + k] = Math.max(this.hi[a], this.hi[b]);
      }
    }
    this.buckets = half;
    this.width *= 2;
  }

  /** Buckets so far (the partial last one included) as plain arrays, values rounded. */
  output(digits: Record<string, number>, transform?: (name: string, tS: number, v: number) => number): TraceOutput {
    const c = this.names.length;
    const n = this.buckets + (this.inBucket > 0 ? 1 : 0);
    const channels: TraceOutput["channels"] = {};
    this.names.forEach((name, k) => {
      const f = 10 ** (digits[name] ?? 2);
      const conv = (v: number, t: number) => {
        if (!Number.isFinite(v)) return null;
        const x = transform ? transform(name, t, v) : v;
        return Number.isFinite(x) ? Math.round(x * f) / f : null;
      };
      const min: (number | null)[] = [];
      const max: (number | null)[] = [];
      for (let i = 0; i < n; i++) {
        min.push(conv(this.lo[i * c + k], this.t0[i]));
        max.push(conv(this.hi[i * c + k], this.t0[i]));
      }
      channels[name] = { min, max };
    });
    const t_s: number[] = [];
    for (let i = 0; i < n; i++) t_s.push(Math.round(this.t0[i] * 1000) / 1000);
    return { bucket_rows: this.width, t_s, channels };
  }
}

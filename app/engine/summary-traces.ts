/**
 * Decimated traces for charts. The log's length is unknown while streaming, so each bucket starts
 * one row wide; when all buckets are full, neighbours merge pairwise and the width doubles.
 * Every bucket keeps the min and max of each channel (spikes survive decimation) and its first time.
 */
/** The chart channels, in SI inside the decimator (converted to display units at output). */
export const TRACE_CHANNELS = ["speed_kmh", "lat_accel_g", "long_accel_g", "steer_deg", "damper_fl_mm", "damper_fr_mm", "damper_rl_mm", "damper_rr_mm", "axle_load_front_n", "axle_load_rear_n", "ride_height_front_mm", "ride_height_rear_mm", "yaw_rate_deg_s"] as const;

export interface TraceOutput {
  bucket_rows: number;
  t_s: number[];
  channels: Record<string, { min: (number | null)[]; max: (number | null)[] }>;
}

/** A decimator's buckets as plain data (it crosses threads when a log is analysed in parts). */
export interface TraceState {
  width: number;
  buckets: number;
  t0: Float64Array;
  lo: Float64Array;
  hi: Float64Array;
}

/** Merges neighbouring buckets pairwise in place (an odd last bucket stays alone); returns the new count. */
function pairUp(t0: Float64Array, lo: Float64Array, hi: Float64Array, n: number, c: number): number {
  const half = Math.ceil(n / 2);
  for (let i = 0; i < half; i++) {
    const a = 2 * i, b = a + 1 < n ? a + 1 : a;
    t0[i] = t0[a];
    for (let k = 0; k < c; k++) {
      lo[i * c + k] = Math.min(lo[a * c + k], lo[b * c + k]);
      hi[i * c + k] = Math.max(hi[a * c + k], hi[b * c + k]);
    }
  }
  return half;
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
   * Add rows `from` … `count` − 1 column by column (tight loops; no per-row calls). `cols[k]` null =
   * channel not logged.
   */
  pushColumns(t: Float64Array, cols: ReadonlyArray<Float64Array | null>, count: number, from = 0): void {
    const c = this.names.length;
    let j = from;
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
    this.buckets = pairUp(this.t0, this.lo, this.hi, this.buckets, this.names.length);
    this.width *= 2;
  }

  /** The buckets so far (the partial last one included), for merging parts of one log. */
  state(): TraceState {
    const n = this.buckets + (this.inBucket > 0 ? 1 : 0), c = this.names.length;
    return { width: this.width, buckets: n, t0: this.t0.slice(0, n), lo: this.lo.slice(0, n * c), hi: this.hi.slice(0, n * c) };
  }

  /** Starts from a part's buckets (the first part of a log). */
  restore(st: TraceState): void {
    const c = this.names.length;
    this.width = st.width;
    this.buckets = st.buckets;
    this.inBucket = 0;
    this.t0.set(st.t0.subarray(0, st.buckets));
    this.lo.set(st.lo.subarray(0, st.buckets * c));
    this.hi.set(st.hi.subarray(0, st.buckets * c));
    if (this.buckets === this.cap) this.merge();
  }

  /**
   * Appends the buckets of the log's next part (in time order). Both sides are brought to the wider
   * bucket width first; a part's partial last bucket stays one (narrower) bucket, so `bucket_rows`
   * is then the width of all buckets but those at part ends.
   */
  append(next: TraceState): void {
    const c = this.names.length;
    if (this.inBucket > 0) { this.buckets++; this.inBucket = 0; }
    let { width, buckets: n } = next;
    const t0 = next.t0.slice(), lo = next.lo.slice(), hi = next.hi.slice();
    while (width < this.width) { n = pairUp(t0, lo, hi, n, c); width *= 2; }
    while (this.width < width) this.merge();
    for (let i = 0; i < n; i++) {
      if (this.buckets === this.cap) this.merge();
      // Bucket i of the next part lands at `this.buckets` (after any merge above).
      const b = this.buckets++;
      this.t0[b] = t0[i];
      for (let k = 0; k < c; k++) { this.lo[b * c + k] = lo[i * c + k]; this.hi[b * c + k] = hi[i * c + k]; }
    }
    if (this.buckets === this.cap) this.merge();
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

/**
 * Streaming centred moving averages over blocks, with a common delay.
 *
 * Each channel gets a boxcar of 2h+1 samples centred on the same output row, so the filter has
 * zero phase relative to the other channels: the whole row is delayed by D = max h samples, and the
 * last 2D raw samples are carried into the next block. A boxcar of length T has its −3 dB point near
 * 0.443/T: 0.11 s ≈ 4 Hz for dampers, 0.21 s ≈ 2 Hz for the understeer gates. The slope is the
 * difference of the two half-window means over (h+1) samples, a derivative much less noisy than a
 * one-step difference. NaN (dropout) samples are left out of the sums; an output is NaN when fewer
 * than h+1 of the 2h+1 samples are valid.
 *
 * Work is done column by column with block-local prefix sums (tight loops, no per-row calls).
 * `centre` (and `mean` of an unfiltered channel) are views into the delay line, not copies: they
 * stay valid until the next push or flush, which first carries the last 2D samples forward.
 */
export class BlockSmoother {
  readonly channels: number;
  readonly delay: number;
  /** Per channel, valid for indices 0 … (count returned by push/flush) − 1. */
  mean: Float64Array[] = [];
  slope: Float64Array[] = [];
  centre: Float64Array[] = [];

  private readonly half: Int32Array;
  private readonly slopeScale: Float64Array;
  private readonly needSlope: boolean[];
  private readonly absent: boolean[];
  private ext: Float64Array[] = [];
  private pre: Float64Array = new Float64Array(0);
  private cnt: Float64Array = new Float64Array(0);
  private cap = 0;
  private seen = 0;
  /** Rows of the last compute whose tail (2D samples) is still to be carried to the front. */
  private carryFrom = -1;
  /** Own output arrays (absent channels are written here; `centre`/`mean` may point into `ext`). */
  private ownMean: Float64Array[] = [];
  private ownCentre: Float64Array[] = [];
  /** Per channel: leading rows of `slope` known to hold NaN already (skips refilling unused slopes). */
  private slopeNaN: Int32Array = new Int32Array(0);

  /** `needSlope[k]` false skips the slope of channel k (its slope output stays NaN). */
  constructor(halfWindows: ArrayLike<number>, dtS: number, needSlope?: boolean[], capacityRows = 16_384) {
    this.channels = halfWindows.length;
    this.needSlope = Array.from({ length: this.channels }, (_, k) => needSlope?.[k] ?? true);
    this.absent = new Array(this.channels).fill(false);
    this.half = Int32Array.from(halfWindows as ArrayLike<number>);
    let d = 0;
    for (let i = 0; i < this.channels; i++) d = Math.max(d, this.half[i]);
    this.delay = d;
    this.slopeScale = Float64Array.from(this.half, (h) => (h > 0 ? 1 / ((h + 1) * dtS) : NaN));
    this.grow(capacityRows);
    for (const e of this.ext) e.fill(NaN, 0, 2 * d);
  }

  private grow(rows: number): void {
    const d2 = 2 * this.delay;
    const old = this.ext;
    this.cap = rows;
    this.ext = [];
    this.mean = [];
    this.slope = [];
    this.centre = [];
    for (let k = 0; k < this.channels; k++) {
      const e = new Float64Array(rows + d2);
      if (old[k]) e.set(old[k].subarray(0, d2));
      this.ext.push(e);
      this.mean.push(new Float64Array(rows));
      this.slope.push(new Float64Array(rows));
      this.centre.push(new Float64Array(rows));
    }
    this.ownMean = this.mean.slice();
    this.ownCentre = this.centre.slice();
    this.slopeNaN = new Int32Array(this.channels);
    this.pre = new Float64Array(rows + d2 + 1);
    this.cnt = new Float64Array(rows + d2 + 1);
  }

  /** Feed `rows` rows (null column = not logged → NaN). Returns how many delayed rows are ready. */
  push(cols: ReadonlyArray<Float64Array | null>, rows: number): number {
    this.carry();
    if (rows > this.cap) this.grow(rows);
    const d = this.delay, d2 = 2 * d;
    for (let k = 0; k < this.channels; k++) {
      const e = this.ext[k];
      const col = cols[k];
      this.absent[k] = col === null;
      if (col === null) e.fill(NaN, d2, d2 + rows);
      else e.set(col.subarray(0, rows), d2);
    }
    return this.compute(rows);
  }

  /** End of stream: push D empty rows so the last real rows come out. */
  flush(): number {
    const d = this.delay, d2 = 2 * d;
    if (d === 0) return 0;
    this.carry();
    for (let k = 0; k < this.channels; k++) this.ext[k].fill(NaN, d2, d2 + d);
    return this.compute(d);
  }

  /** Slope rows 0 … out−1 of channel k set to NaN (only the rows not known to be NaN already). */
  private nanSlope(k: number, out: number): void {
    const done = this.slopeNaN[k];
    if (out > done) { this.slope[k].fill(NaN, done, out); this.slopeNaN[k] = out; }
  }

  /** Carry the last 2D raw samples of the previous block to the front of each delay line. */
  private carry(): void {
    const r = this.carryFrom;
    if (r < 0) return;
    const d2 = 2 * this.delay;
    for (let k = 0; k < this.channels; k++) this.ext[k].copyWithin(0, r, r + d2);
    this.carryFrom = -1;
  }

  private compute(rows: number): number {
    const d = this.delay, d2 = 2 * d;
    const n0 = this.seen;
    this.seen += rows;
    // ext index e ↔ stream row n0 − 2D + e; centres e = D … rows+D−1, but never before row 0.
    const eStart = Math.max(d, d2 - n0);
    const eEnd = rows + d;
    const out = Math.max(0, eEnd - eStart);
    const len = rows + d2;
    const pre = this.pre, cnt = this.cnt;
    for (let k = 0; k < this.channels; k++) {
      const e = this.ext[k];
      const h = this.half[k];
      const slope = this.slope[k];
      const mean = this.ownMean[k];
      this.mean[k] = mean;
      if (this.absent[k] && out > 0) {
        // A channel that is not logged: NaN out, no sums.
        const centre = this.ownCentre[k];
        this.centre[k] = centre;
        mean.fill(NaN, 0, out); this.nanSlope(k, out); centre.fill(NaN, 0, out);
        continue;
      }
      this.centre[k] = e.subarray(eStart, eStart + out);
      if (h === 0) {
        this.mean[k] = this.centre[k];
        this.nanSlope(k, out);
      } else {
        const scale = this.slopeScale[k];
        if (this.needSlope[k]) this.slopeNaN[k] = 0;
        if (out > 0 && this.runningSums(e, h, eStart, eEnd, mean, this.needSlope[k] ? slope : null, scale)) {
          if (!this.needSlope[k]) this.nanSlope(k, out);
          continue;
        }
        // The block holds a dropout: prefix sums with counts.
        let s = 0;
        pre[0] = 0;
        for (let i = 0; i < len; i++) {
          const x = e[i];
          if (x === x) s += x;
          pre[i + 1] = s;
        }
        let n = 0;
        cnt[0] = 0;
        for (let i = 0; i < len; i++) {
          if (e[i] === e[i]) n++;
          cnt[i + 1] = n;
        }
        for (let c = eStart, j = 0; c < eEnd; c++, j++) {
          const nAll = cnt[c + h + 1] - cnt[c - h];
          mean[j] = nAll >= h + 1 ? (pre[c + h + 1] - pre[c - h]) / nAll : NaN;
        }
        if (this.needSlope[k]) {
          this.slopeNaN[k] = 0;
          for (let c = eStart, j = 0; c < eEnd; c++, j++) {
            const n1 = cnt[c] - cnt[c - h], n2 = cnt[c + h + 1] - cnt[c + 1];
            slope[j] = n1 * 2 >= h && n2 * 2 >= h && n1 > 0 && n2 > 0
              ? ((pre[c + h + 1] - pre[c + 1]) / n2 - (pre[c] - pre[c - h]) / n1) * scale
              : NaN;
          }
        } else this.nanSlope(k, out);
      }
    }
    // The last 2D raw samples move to the front at the next push/flush (the views stay valid till then).
    this.carryFrom = rows;
    return out;
  }

  /**
   * Fast path for a block without dropouts: one pass of running window and half-window sums.
   * Returns false (outputs to be recomputed) as soon as a NaN shows up in the sums.
   */
  private runningSums(e: Float64Array, h: number, c0: number, c1: number, mean: Float64Array, slope: Float64Array | null, scale: number): boolean {
    let s1 = 0, s2 = 0;
    for (let i = c0 - h; i < c0; i++) s1 += e[i];
    for (let i = c0 + 1; i <= c0 + h; i++) s2 += e[i];
    let xc = e[c0];
    const inv = 1 / (2 * h + 1), k = scale / h;
    mean[0] = (s1 + xc + s2) * inv;
    // Two copies of the loop, with and without the slope (the compiler does not unswitch loops).
    // First half gains the old centre and loses c−h−1; second half gains c+h and loses the new centre.
    if (slope) {
      slope[0] = (s2 - s1) * k;
      for (let c = c0 + 1, j = 1; c < c1; c++, j++) {
        s1 += xc - e[c - h - 1];
        xc = e[c];
        s2 += e[c + h] - xc;
        mean[j] = (s1 + xc + s2) * inv;
        slope[j] = (s2 - s1) * k;
      }
    } else {
      for (let c = c0 + 1, j = 1; c < c1; c++, j++) {
        s1 += xc - e[c - h - 1];
        xc = e[c];
        s2 += e[c + h] - xc;
        mean[j] = (s1 + xc + s2) * inv;
      }
    }
    return s1 === s1 && s2 === s2 && xc === xc;
  }
}

/**
 * Streaming centred moving averages over blocks, with a common delay.
 *
 * Each channel gets a boxcar of 2h+1 samples centred on the same output row, so the filter has
 * zero phase relative to the other channels: the whole row is delayed by D = max h samples, and the
 * last 2D + 1 raw samples are carried into the next block. A boxcar of length T has its −3 dB point
 * near 0.443/T: 0.11 s ≈ 4 Hz for dampers, 0.21 s ≈ 2 Hz for the understeer gates. The slope is the
 * difference of the two half-window means over (h+1) samples, a derivative much less noisy than a
 * one-step difference. NaN (dropout) samples are left out of the sums; an output is NaN when fewer
 * than h+1 of the 2h+1 samples are valid.
 *
 * The window sums run from row to row (add the sample entering, take off the one leaving) and are
 * computed afresh at **restart rows**: the first row, and every row whose time (channel
 * `restart.channel`) enters a new period of `restart.periodS` seconds counted from the log's first
 * row (the summary's time blocks). A run over a part of the log (split.ts) therefore computes each
 * output after its first restart with the very same additions, in the same order, as the whole-log
 * run, whatever the block sizes: the outputs agree bit for bit (`exactFrom`).
 *
 * Work is done column by column in tight loops (no per-row calls). `centre` (and `mean` of an
 * unfiltered channel) are views into the delay line, not copies: they stay valid until the next
 * push or flush, which first carries the last 2D + 1 samples forward.
 */
export interface SmootherRestart {
  /** Channel holding the time (s), unfiltered. */
  channel: number;
  periodS: number;
  /** Time the periods count from: the log's first row (NaN: this stream's first row). */
  t0: number;
}

export class BlockSmoother {
  readonly channels: number;
  readonly delay: number;
  /** Per channel, valid for indices 0 … (count returned by push/flush) − 1. */
  mean: Float64Array[] = [];
  slope: Float64Array[] = [];
  centre: Float64Array[] = [];
  /**
   * With restarts: the stream row from which every output equals that of a run over the whole log,
   * bit for bit, when this run starts inside it (the first restart row whose window lies wholly in
   * this run's rows); −1 until one is seen. A run from the log's first row is exact throughout.
   */
  exactFrom = -1;

  private readonly half: Int32Array;
  private readonly slopeScale: Float64Array;
  private readonly needSlope: boolean[];
  private readonly absent: boolean[];
  private readonly restart: SmootherRestart | null;
  /** Carried samples: 2D + 1 (the row leaving a window is one before its left edge). */
  private readonly pad: number;
  private ext: Float64Array[] = [];
  private cap = 0;
  private seen = 0;
  /** Rows of the last compute whose tail (pad samples) is still to be carried to the front. */
  private carryFrom = -1;
  /** Own output arrays (absent channels are written here; `centre`/`mean` may point into `ext`). */
  private ownMean: Float64Array[] = [];
  private ownCentre: Float64Array[] = [];
  /** Per channel: leading rows of `slope` known to hold NaN already (skips refilling unused slopes). */
  private slopeNaN: Int32Array = new Int32Array(0);
  /** Running half-window sums and counts per channel, carried from one compute to the next. */
  private readonly s1: Float64Array;
  private readonly n1: Float64Array;
  private readonly s2: Float64Array;
  private readonly n2: Float64Array;
  /** Restart rows of the current compute, as offsets from its first centre (ascending), and their count. */
  private restartRows: Int32Array = new Int32Array(0);
  private restartCount = 0;

  /** `needSlope[k]` false skips the slope of channel k (its slope output stays NaN). */
  constructor(halfWindows: ArrayLike<number>, dtS: number, needSlope?: boolean[], capacityRows = 16_384, restart: SmootherRestart | null = null) {
    this.channels = halfWindows.length;
    this.needSlope = Array.from({ length: this.channels }, (_, k) => needSlope?.[k] ?? true);
    this.absent = new Array(this.channels).fill(false);
    this.half = Int32Array.from(halfWindows as ArrayLike<number>);
    let d = 0;
    for (let i = 0; i < this.channels; i++) d = Math.max(d, this.half[i]);
    this.delay = d;
    this.pad = 2 * d + 1;
    this.restart = restart ? { ...restart } : null;
    this.slopeScale = Float64Array.from(this.half, (h) => (h > 0 ? 1 / ((h + 1) * dtS) : NaN));
    this.s1 = new Float64Array(this.channels); this.n1 = new Float64Array(this.channels);
    this.s2 = new Float64Array(this.channels); this.n2 = new Float64Array(this.channels);
    this.grow(capacityRows);
    for (const e of this.ext) e.fill(NaN, 0, this.pad);
  }

  private grow(rows: number): void {
    const p = this.pad;
    const old = this.ext;
    this.cap = rows;
    this.ext = [];
    this.mean = [];
    this.slope = [];
    this.centre = [];
    for (let k = 0; k < this.channels; k++) {
      const e = new Float64Array(rows + p);
      if (old[k]) e.set(old[k].subarray(0, p));
      this.ext.push(e);
      this.mean.push(new Float64Array(rows));
      this.slope.push(new Float64Array(rows));
      this.centre.push(new Float64Array(rows));
    }
    this.ownMean = this.mean.slice();
    this.ownCentre = this.centre.slice();
    this.slopeNaN = new Int32Array(this.channels);
    this.restartRows = new Int32Array(rows + p);
  }

  /** Feed `rows` rows (null column = not logged → NaN). Returns how many delayed rows are ready. */
  push(cols: ReadonlyArray<Float64Array | null>, rows: number): number {
    this.carry();
    if (rows > this.cap) this.grow(rows);
    const p = this.pad;
    for (let k = 0; k < this.channels; k++) {
      const e = this.ext[k];
      const col = cols[k];
      this.absent[k] = col === null;
      if (col === null) e.fill(NaN, p, p + rows);
      else e.set(col.subarray(0, rows), p);
    }
    return this.compute(rows);
  }

  /** End of stream: push D empty rows so the last real rows come out. */
  flush(): number {
    const d = this.delay, p = this.pad;
    if (d === 0) return 0;
    this.carry();
    for (let k = 0; k < this.channels; k++) this.ext[k].fill(NaN, p, p + d);
    return this.compute(d);
  }

  /** Slope rows 0 … out−1 of channel k set to NaN (only the rows not known to be NaN already). */
  private nanSlope(k: number, out: number): void {
    const done = this.slopeNaN[k];
    if (out > done) { this.slope[k].fill(NaN, done, out); this.slopeNaN[k] = out; }
  }

  /** Carry the last pad raw samples of the previous block to the front of each delay line. */
  private carry(): void {
    const r = this.carryFrom;
    if (r < 0) return;
    const p = this.pad;
    for (let k = 0; k < this.channels; k++) this.ext[k].copyWithin(0, r, r + p);
    this.carryFrom = -1;
  }

  /**
   * Marks the restart rows among the centres eStart … eEnd − 1 (index j = c − eStart; stream row
   * rowBase + c) and settles `exactFrom`. The stream's first centre always restarts.
   */
  private markRestarts(eStart: number, eEnd: number, rowBase: number): void {
    const at = this.restartRows;
    const r = this.restart;
    const d = this.delay;
    let count = 0;
    if (!r) {
      if (rowBase + eStart === 0) at[count++] = 0;
      this.restartCount = count;
      return;
    }
    const t = this.ext[r.channel], len = r.periodS;
    if (r.t0 !== r.t0) r.t0 = t[eStart];
    const t0 = r.t0;
    // The summary's own block index, ⌊(t − t0) / blockS⌋ (summary-rows.ts), so a part's first owned row restarts.
    let prevPeriod = Math.floor((t[eStart - 1] - t0) / len);
    // The exact index is taken only near a period's end (the division costs more than the test).
    let near = prevPeriod === prevPeriod ? t0 + (prevPeriod + 1) * len - 1e-6 * len : -Infinity;
    for (let c = eStart; c < eEnd; c++) {
      const tc = t[c];
      let period = prevPeriod;
      if (!(tc < near)) {
        period = Math.floor((tc - t0) / len);
        if (period === period) near = t0 + (period + 1) * len - 1e-6 * len;
      }
      // NaN times (the flush's padding) keep the run going.
      const row = rowBase + c;
      if (row === 0 || (period === period && prevPeriod === prevPeriod && period !== prevPeriod)) {
        at[count++] = c - eStart;
        if (this.exactFrom < 0 && row >= d) this.exactFrom = row;
      }
      prevPeriod = period;
    }
    this.restartCount = count;
  }

  private compute(rows: number): number {
    const d = this.delay, p = this.pad;
    const n0 = this.seen;
    this.seen += rows;
    // ext index e ↔ stream row n0 − p + e; centres e = p − d … rows + p − d − 1, but never before row 0.
    const eStart = Math.max(p - d, p - n0);
    const eEnd = rows + p - d;
    const out = Math.max(0, eEnd - eStart);
    if (out > 0) this.markRestarts(eStart, eEnd, n0 - p);
    for (let k = 0; k < this.channels; k++) {
      const e = this.ext[k];
      const h = this.half[k];
      const mean = this.ownMean[k];
      this.mean[k] = mean;
      if (this.absent[k] && out > 0) {
        // A channel that is not logged: NaN out, no sums.
        const centre = this.ownCentre[k];
        this.centre[k] = centre;
        mean.fill(NaN, 0, out); this.nanSlope(k, out); centre.fill(NaN, 0, out);
        this.n1[k] = this.n2[k] = this.s1[k] = this.s2[k] = 0;
        continue;
      }
      this.centre[k] = e.subarray(eStart, eStart + out);
      if (h === 0) {
        this.mean[k] = this.centre[k];
        this.nanSlope(k, out);
        continue;
      }
      if (out === 0) continue;
      const slope = this.needSlope[k] ? this.slope[k] : null;
      if (slope) this.slopeNaN[k] = 0; else this.nanSlope(k, out);
      // The fast loop holds while the carried windows are full, the carried centre (it joins the
      // first half) is valid and no NaN enters; else (it says so at the end) the counting loop runs
      // again from the same state.
      const s1 = this.s1[k], s2 = this.s2[k], lastCentre = e[eStart - 1];
      if (this.n1[k] === h && this.n2[k] === h && lastCentre === lastCentre && this.cleanSums(k, e, h, eStart, eEnd, mean, slope)) continue;
      this.s1[k] = s1; this.s2[k] = s2;
      this.countingSums(k, e, h, eStart, eEnd, mean, slope);
    }
    // The last pad raw samples move to the front at the next push/flush (the views stay valid till then).
    this.carryFrom = rows;
    return out;
  }

  /**
   * Window sums while every count is full (h per half): the carried windows hold no NaN. A NaN that
   * enters makes a running sum NaN until a restart after it has left the window (sliding never
   * clears it), so the sums are looked at before each restart and at the end. Returns false when
   * one was NaN (the outputs are then to be recomputed by countingSums). The additions and their order are those of
   * countingSums, so the two give the same bits on the same samples. The rows between two restarts
   * run in a tight loop (one copy with the slope, one without).
   */
  private cleanSums(k: number, e: Float64Array, h: number, c0: number, c1: number, mean: Float64Array, slope: Float64Array | null): boolean {
    const rs = this.restartRows, nr = this.restartCount;
    const inv = 1 / (2 * h + 1), kFull = this.slopeScale[k] / h;
    let s1 = this.s1[k], s2 = this.s2[k];
    let bad = false;
    let c = c0, r = 0;
    while (c < c1) {
      const next = r < nr ? c0 + rs[r] : c1;
      if (c === next) {
        if (s1 !== s1 || s2 !== s2) bad = true;
        s1 = 0; s2 = 0;
        for (let i = c - h; i < c; i++) s1 += e[i];
        for (let i = c + 1; i <= c + h; i++) s2 += e[i];
        mean[c - c0] = (s1 + e[c] + s2) * inv;
        if (slope) slope[c - c0] = (s2 - s1) * kFull;
        c++; r++;
        continue;
      }
      // First half gains the old centre and loses c − h − 1; second half gains c + h and loses the new centre.
      if (slope) {
        for (let j = c - c0; c < next; c++, j++) {
          s1 += e[c - 1] - e[c - h - 1];
          s2 += e[c + h] - e[c];
          mean[j] = (s1 + e[c] + s2) * inv;
          slope[j] = (s2 - s1) * kFull;
        }
      } else {
        for (let j = c - c0; c < next; c++, j++) {
          s1 += e[c - 1] - e[c - h - 1];
          s2 += e[c + h] - e[c];
          mean[j] = (s1 + e[c] + s2) * inv;
        }
      }
    }
    // The last centre joins the first half only at the next row: looked at on its own.
    const last = e[c1 - 1];
    if (bad || s1 !== s1 || s2 !== s2 || last !== last) return false;
    this.s1[k] = s1; this.s2[k] = s2;
    return true;
  }

  /** Window sums with NaN left out (counts per half); outputs NaN when fewer than h + 1 samples are valid. */
  private countingSums(k: number, e: Float64Array, h: number, c0: number, c1: number, mean: Float64Array, slope: Float64Array | null): void {
    const rs = this.restartRows, nr = this.restartCount;
    const full = 2 * h + 1, inv = 1 / full, scale = this.slopeScale[k], kFull = scale / h;
    let s1 = this.s1[k], s2 = this.s2[k], n1 = this.n1[k], n2 = this.n2[k];
    let r = 0;
    for (let c = c0, j = 0; c < c1; c++, j++) {
      if (r < nr && rs[r] === j) {
        r++;
        let x: number;
        s1 = 0; s2 = 0; n1 = 0; n2 = 0;
        for (let i = c - h; i < c; i++) { x = e[i]; if (x === x) { s1 += x; n1++; } }
        for (let i = c + 1; i <= c + h; i++) { x = e[i]; if (x === x) { s2 += x; n2++; } }
      } else {
        // As in cleanSums when both samples are valid (the same bits), else one at a time.
        const a1 = e[c - 1], b1 = e[c - h - 1], a2 = e[c + h], b2 = e[c];
        if (a1 === a1 && b1 === b1) s1 += a1 - b1;
        else { if (a1 === a1) { s1 += a1; n1++; } if (b1 === b1) { s1 -= b1; n1--; } }
        if (a2 === a2 && b2 === b2) s2 += a2 - b2;
        else { if (a2 === a2) { s2 += a2; n2++; } if (b2 === b2) { s2 -= b2; n2--; } }
      }
      const xc = e[c];
      const n = n1 + n2 + (xc === xc ? 1 : 0);
      mean[j] = n === full ? (s1 + xc + s2) * inv : n >= h + 1 ? (s1 + (xc === xc ? xc : 0) + s2) / n : NaN;
      if (slope) {
        slope[j] = n1 === h && n2 === h ? (s2 - s1) * kFull
          : n1 * 2 >= h && n2 * 2 >= h && n1 > 0 && n2 > 0 ? (s2 / n2 - s1 / n1) * scale : NaN;
      }
    }
    this.s1[k] = s1; this.s2[k] = s2; this.n1[k] = n1; this.n2[k] = n2;
  }
}

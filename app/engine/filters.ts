/**
 * Streaming centred moving averages with a common delay line.
 *
 * Each channel gets a boxcar of 2h+1 samples centred on the same output row, so the filter has
 * zero phase relative to the other channels (the whole row is delayed by D = max h samples).
 * A boxcar of length T has its −3 dB point near 0.443/T: 0.11 s ≈ 4 Hz for dampers,
 * 0.21 s ≈ 2 Hz for the understeer gates. The slope is the difference of the two half-window
 * means over (h+1) samples, a derivative that is much less noisy than a one-step difference.
 * NaN (dropout) samples are left out of the sums; an output is NaN when fewer than h+1 of the
 * 2h+1 samples are valid.
 */
export class CentredSmoother {
  readonly channels: number;
  readonly delay: number;
  /** Filtered value of each channel at the centre row (valid after `step` returns true). */
  readonly mean: Float64Array;
  /** Slope per second at the centre row. */
  readonly slope: Float64Array;
  /** Unfiltered value at the centre row. */
  readonly centre: Float64Array;

  private readonly half: Int32Array;
  private readonly ring: Float64Array;
  private readonly mask: number;
  private readonly s1: Float64Array;
  private readonly n1: Float64Array;
  private readonly s2: Float64Array;
  private readonly n2: Float64Array;
  private readonly slopeScale: Float64Array;
  private row = 0;

  constructor(halfWindows: ArrayLike<number>, dtS: number) {
    const c = halfWindows.length;
    this.channels = c;
    this.half = Int32Array.from(halfWindows as ArrayLike<number>);
    let d = 0;
    for (let i = 0; i < c; i++) d = Math.max(d, this.half[i]);
    this.delay = d;
    let size = 1;
    while (size < 2 * d + 2) size <<= 1;
    this.mask = size - 1;
    this.ring = new Float64Array(size * c).fill(NaN);
    this.mean = new Float64Array(c);
    this.slope = new Float64Array(c);
    this.centre = new Float64Array(c);
    this.s1 = new Float64Array(c);
    this.n1 = new Float64Array(c);
    this.s2 = new Float64Array(c);
    this.n2 = new Float64Array(c);
    this.slopeScale = new Float64Array(c);
    for (let i = 0; i < c; i++) this.slopeScale[i] = 1 / ((this.half[i] + 1) * dtS);
  }

  /**
   * Take row `r` of the given columns (null column = not logged → NaN). Returns true when an
   * output row (delayed by `delay`) is ready in mean/slope/centre.
   */
  step(cols: ReadonlyArray<Float64Array | null>, r: number): boolean {
    const c = this.channels;
    const ring = this.ring;
    const mask = this.mask;
    const i = this.row++;
    const base = (i & mask) * c;
    for (let k = 0; k < c; k++) {
      const col = cols[k];
      ring[base + k] = col === null ? NaN : col[r];
    }
    return this.advance(i);
  }

  /** Push an empty row (end of stream): call `delay` times; true when a delayed row is ready. */
  flushStep(): boolean {
    const c = this.channels;
    const i = this.row++;
    const base = (i & this.mask) * c;
    for (let k = 0; k < c; k++) this.ring[base + k] = NaN;
    return this.advance(i);
  }

  private advance(i: number): boolean {
    const centreRow = i - this.delay;
    const c = this.channels;
    const ring = this.ring;
    const mask = this.mask;
    const cb = (centreRow & mask) * c;
    const ready = centreRow >= 0;
    for (let k = 0; k < c; k++) {
      const h = this.half[k];
      if (h === 0) {
        if (ready) this.centre[k] = this.mean[k] = ring[cb + k];
        this.slope[k] = NaN;
        continue;
      }
      // second half [c+1, c+h]: gains c+h, loses c (which becomes the centre)
      if (centreRow + h >= 0) {
        const enter = ring[((centreRow + h) & mask) * c + k];
        if (enter === enter) { this.s2[k] += enter; this.n2[k]++; }
      }
      if (!ready) continue;
      const xc = ring[cb + k];
      this.centre[k] = xc;
      if (xc === xc) { this.s2[k] -= xc; this.n2[k]--; }
      // first half [c−h, c−1]: gains c−1, loses c−h−1
      if (centreRow >= 1) {
        const prev = ring[((centreRow - 1) & mask) * c + k];
        if (prev === prev) { this.s1[k] += prev; this.n1[k]++; }
      }
      if (centreRow >= h + 1) {
        const leave = ring[((centreRow - h - 1) & mask) * c + k];
        if (leave === leave) { this.s1[k] -= leave; this.n1[k]--; }
      }
      const n1 = this.n1[k];
      const n2 = this.n2[k];
      const nc = xc === xc ? 1 : 0;
      const n = n1 + n2 + nc;
      this.mean[k] = n >= h + 1 ? (this.s1[k] + this.s2[k] + (nc ? xc : 0)) / n : NaN;
      this.slope[k] = n1 * 2 >= h && n2 * 2 >= h && n1 > 0 && n2 > 0 ? (this.s2[k] / n2 - this.s1[k] / n1) * this.slopeScale[k] : NaN;
    }
    return ready;
  }
}

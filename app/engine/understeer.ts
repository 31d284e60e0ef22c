/**
 * Understeer gradient per speed band (SAE J670 / ISO 8855 definition, steady-state relation from
 * Gillespie ch. 6): u = δ_road − 57.3·L·κ, K = slope of u against ay (g) through the origin.
 *
 * The steering offset is one constant for the stint, estimated from straight-line samples. Since
 * u = u_raw − offset/N is linear in the offset, the accumulator stores sums of u_raw and applies the
 * offset at the end. Samples are binned by |ay| (0.05 g) so that the upper gate (a fraction of the
 * band's peak, to stay out of the tyres' non-linear range) can be chosen once the peak is known.
 * Intervals use per-block means (one per block, band and |ay| bin).
 */
import { fitThroughOrigin } from "./regression";
import { interval95, meanInterval } from "./stats";

export const AY_BIN_G = 0.05;
export const AY_BINS = 50;
const INV_AY_BIN = 1 / AY_BIN_G;

const S_N = 0, S_A = 1, S_AA = 2, S_AU = 3, S_U = 4, S_UU = 5;
const STRIDE = 6;

export class UndersteerAccumulator {
  readonly bandCount: number;
  /** Sample-level sums per (band, bin). */
  readonly cells: Float64Array;
  /** Sums of block means per (band, bin). */
  readonly blockCells: Float64Array;
  readonly peakAyG: Float64Array;
  readonly left: Float64Array;
  readonly right: Float64Array;
  private readonly scratch: Float64Array;
  private readonly touched: Int32Array;
  private touchedCount = 0;
  /** Straight-line samples for the steering offset (steering-wheel deg). */
  offsetN = 0; offsetSum = 0; offsetSumSq = 0;
  offsetBlocks = 0; offsetBlockSum = 0; offsetBlockSumSq = 0;
  private obN = 0; private obSum = 0;
  /** Sign checks: Σ δ_road·geom and Σ geom² over cornering samples. */
  signDot = 0; signNorm = 0;

  constructor(bandCount: number) {
    this.bandCount = bandCount;
    const n = bandCount * AY_BINS;
    this.cells = new Float64Array(n * STRIDE);
    this.blockCells = new Float64Array(n * STRIDE);
    this.scratch = new Float64Array(n * 3);
    this.touched = new Int32Array(n);
    this.peakAyG = new Float64Array(bandCount);
    this.left = new Float64Array(bandCount);
    this.right = new Float64Array(bandCount);
  }

  addStraight(steerDeg: number): void {
    this.offsetN++; this.offsetSum += steerDeg; this.offsetSumSq += steerDeg * steerDeg;
    this.obN++; this.obSum += steerDeg;
  }

  addCorner(band: number, ayG: number, uRawDeg: number): void {
    const abs = ayG < 0 ? -ayG : ayG;
    let bin = (abs * INV_AY_BIN) | 0;
    if (bin >= AY_BINS) bin = AY_BINS - 1;
    const cell = band * AY_BINS + bin;
    const o = cell * STRIDE;
    const c = this.cells;
    c[o + S_N]++; c[o + S_A] += ayG; c[o + S_AA] += ayG * ayG; c[o + S_AU] += ayG * uRawDeg; c[o + S_U] += uRawDeg; c[o + S_UU] += uRawDeg * uRawDeg;
    const so = cell * 3;
    if (this.scratch[so] === 0) this.touched[this.touchedCount++] = cell;
    this.scratch[so]++; this.scratch[so + 1] += ayG; this.scratch[so + 2] += uRawDeg;
    if (abs > this.peakAyG[band]) this.peakAyG[band] = abs;
    if (ayG > 0) this.left[band]++; else this.right[band]++;
  }

  closeBlock(minSamples: number): void {
    for (let i = 0; i < this.touchedCount; i++) {
      const cell = this.touched[i];
      const so = cell * 3;
      const n = this.scratch[so];
      if (n >= minSamples) {
        const a = this.scratch[so + 1] / n;
        const u = this.scratch[so + 2] / n;
        const o = cell * STRIDE;
        const b = this.blockCells;
        b[o + S_N]++; b[o + S_A] += a; b[o + S_AA] += a * a; b[o + S_AU] += a * u; b[o + S_U] += u; b[o + S_UU] += u * u;
      }
      this.scratch[so] = this.scratch[so + 1] = this.scratch[so + 2] = 0;
    }
    this.touchedCount = 0;
    if (this.obN >= minSamples) {
      const m = this.obSum / this.obN;
      this.offsetBlocks++; this.offsetBlockSum += m; this.offsetBlockSumSq += m * m;
    }
    this.obN = 0; this.obSum = 0;
  }
}

export interface SteeringOffset {
  /** Steering-wheel degrees; null when it cannot be estimated. */
  offset_deg: number | null;
  ci95_deg: [number, number] | null;
  samples: number;
  source: "straights" | "corners" | "none";
}

export function estimateSteeringOffset(acc: UndersteerAccumulator, minBlocks: number, steeringRatio: number, firstBin: number): SteeringOffset {
  if (acc.offsetBlocks >= minBlocks) {
    const mi = meanInterval(acc.offsetBlocks, acc.offsetBlockSum, acc.offsetBlockSumSq);
    return { offset_deg: acc.offsetSum / acc.offsetN, ci95_deg: mi.ci95, samples: acc.offsetN, source: "straights" };
  }
  // Fallback: one intercept shared by all bands, u = c + K_b·ay; needs both turn directions.
  let num = 0, den = 0, n = 0;
  for (let b = 0; b < acc.bandCount; b++) {
    const s = sumBins(acc.cells, b, firstBin, AY_BINS);
    if (s.saa <= 0) continue;
    num += s.su - (s.sau * s.sa) / s.saa;
    den += s.n - (s.sa * s.sa) / s.saa;
    n += s.n;
  }
  if (den > 0.05 * n && n > 0) return { offset_deg: (num / den) * steeringRatio, ci95_deg: null, samples: n, source: "corners" };
  return { offset_deg: null, ci95_deg: null, samples: acc.offsetN, source: "none" };
}

function sumBins(cells: Float64Array, band: number, from: number, to: number) {
  let n = 0, sa = 0, saa = 0, sau = 0, su = 0, suu = 0;
  for (let bin = from; bin < to; bin++) {
    const o = (band * AY_BINS + bin) * STRIDE;
    n += cells[o + S_N]; sa += cells[o + S_A]; saa += cells[o + S_AA]; sau += cells[o + S_AU]; su += cells[o + S_U]; suu += cells[o + S_UU];
  }
  return { n, sa, saa, sau, su, suu };
}

/** The band's peak |ay|: the upper edge of the bin holding the 99.5th percentile (single spikes ignored). */
function robustPeakG(cells: Float64Array, band: number, maxG: number): number {
  let total = 0;
  for (let bin = 0; bin < AY_BINS; bin++) total += cells[(band * AY_BINS + bin) * STRIDE + S_N];
  let cum = 0;
  for (let bin = 0; bin < AY_BINS; bin++) {
    cum += cells[(band * AY_BINS + bin) * STRIDE + S_N];
    if (cum >= 0.995 * total) return Math.min(maxG, (bin + 1) * AY_BIN_G);
  }
  return maxG;
}

export interface BandUndersteer {
  k_deg_per_g: number;
  ci95_deg_per_g: [number, number] | null;
  samples: number;
  blocks: number;
  peak_lat_g: number;
  upper_gate_g: number;
  left_samples: number;
  right_samples: number;
}

/**
 * K for one band with the offset removed (offset in steering-wheel deg, δ_road = δ_sw/N).
 * Bins from `minLatG` up to `maxFraction`·peak are used. Null when no samples pass.
 */
export function bandUndersteer(acc: UndersteerAccumulator, band: number, offsetRoadDeg: number, minLatG: number, maxFraction: number): BandUndersteer | null {
  const peak = robustPeakG(acc.cells, band, acc.peakAyG[band]);
  const upper = maxFraction * peak;
  const from = Math.round(minLatG / AY_BIN_G);
  const to = Math.min(AY_BINS, Math.floor(upper / AY_BIN_G));
  if (to <= from) return null;
  const s = sumBins(acc.cells, band, from, to);
  const b = sumBins(acc.blockCells, band, from, to);
  const o = offsetRoadDeg;
  // u = u_raw − o:  Σa·u = Σa·u_raw − o·Σa ;  Σu² = Σu_raw² − 2oΣu_raw + o²n
  const fit = fitThroughOrigin(s.n, s.saa, s.sau - o * s.sa, s.suu - 2 * o * s.su + o * o * s.n);
  if (!fit) return null;
  let ci: [number, number] | null = null;
  if (b.n >= 3 && b.saa > 0) {
    const sau = b.sau - o * b.sa;
    const suu = b.suu - 2 * o * b.su + o * o * b.n;
    const rss = Math.max(0, suu - 2 * fit.slope * sau + fit.slope * fit.slope * b.saa);
    ci = interval95(fit.slope, Math.sqrt(rss / (b.n - 1) / b.saa), b.n - 1);
  }
  // Direction counts are kept per band, not per bin: a fair proxy for "both directions present".
  const left = acc.left[band];
  const right = acc.right[band];
  return { k_deg_per_g: fit.slope, ci95_deg_per_g: ci, samples: s.n, blocks: b.n, peak_lat_g: peak, upper_gate_g: upper, left_samples: left, right_samples: right };
}

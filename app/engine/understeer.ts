/**
 * Understeer gradient per speed band (SAE J670 / ISO 8855 definition, steady-state relation from
 * Gillespie ch. 6): u = δ_road − 57.3·L·κ, K = slope of u against ay (g) through the origin.
 *
 * Steady cornering is found on zero-phase smoothed channels (summary-rows.ts gates) and kept as
 * segments: runs of consecutive samples that pass every gate, in one speed band, cut at the 1 s
 * time-block edges (so a log analysed in parts gives the same segments). Every passing sample counts
 * towards the gradient; the interval comes from the segments' means (samples within a run are
 * strongly autocorrelated, segments far less). No sample is dropped for sharing a cell or a block
 * with few others.
 *
 * The steering offset is one constant for the stint, estimated from straight-line samples. Since
 * u = u_raw − offset/N is linear in the offset, the sums hold u_raw and the offset is applied at the
 * end. An |ay| histogram per band (0.05 g cells) gives the band's peak for the optional upper gate
 * (a fraction of the peak, applied to each segment's mean |ay|).
 */
import { fitThroughOrigin } from "./regression";
import { interval95, meanInterval } from "./stats";

export const AY_BIN_G = 0.05;
export const AY_BINS = 50;
const INV_AY_BIN = 1 / AY_BIN_G;

const S_N = 0, S_A = 1, S_AA = 2, S_AU = 3, S_U = 4, S_UU = 5;
const STRIDE = 6;
/** One segment: band, n, Σa, Σa², Σa·u, Σu, Σu², Σ|a|. */
export const SEG_STRIDE = 8;

export class UndersteerAccumulator {
  readonly bandCount: number;
  /** Sample-level sums per (band, |ay| cell): the peak and the offset fallback read them. */
  readonly cells: Float64Array;
  readonly peakAyG: Float64Array;
  readonly left: Float64Array;
  readonly right: Float64Array;
  /** Closed segments, SEG_STRIDE numbers each (`segCount` of them). */
  segs = new Float64Array(SEG_STRIDE * 256);
  segCount = 0;
  /** The open segment (band −1: none). */
  private segBand = -1;
  private readonly seg = new Float64Array(SEG_STRIDE);
  /** Straight-line samples for the steering offset (steering-wheel deg). */
  offsetN = 0; offsetSum = 0; offsetSumSq = 0;
  offsetBlocks = 0; offsetBlockSum = 0; offsetBlockSumSq = 0;
  private obN = 0; private obSum = 0;

  constructor(bandCount: number) {
    this.bandCount = bandCount;
    this.cells = new Float64Array(bandCount * AY_BINS * STRIDE);
    this.peakAyG = new Float64Array(bandCount);
    this.left = new Float64Array(bandCount);
    this.right = new Float64Array(bandCount);
  }

  addStraight(steerDeg: number): void {
    this.offsetN++; this.offsetSum += steerDeg; this.offsetSumSq += steerDeg * steerDeg;
    this.obN++; this.obSum += steerDeg;
  }

  /** A steady-cornering sample: it extends the open segment of its band, or opens one. */
  addCorner(band: number, ayG: number, uRawDeg: number): void {
    const abs = ayG < 0 ? -ayG : ayG;
    let bin = (abs * INV_AY_BIN) | 0;
    if (bin >= AY_BINS) bin = AY_BINS - 1;
    const o = (band * AY_BINS + bin) * STRIDE;
    const c = this.cells;
    c[o + S_N]++; c[o + S_A] += ayG; c[o + S_AA] += ayG * ayG; c[o + S_AU] += ayG * uRawDeg; c[o + S_U] += uRawDeg; c[o + S_UU] += uRawDeg * uRawDeg;
    if (abs > this.peakAyG[band]) this.peakAyG[band] = abs;
    if (ayG > 0) this.left[band]++; else this.right[band]++;
    if (band !== this.segBand) { this.endSegment(); this.segBand = band; }
    const g = this.seg;
    g[1]++; g[2] += ayG; g[3] += ayG * ayG; g[4] += ayG * uRawDeg; g[5] += uRawDeg; g[6] += uRawDeg * uRawDeg; g[7] += abs;
  }

  /** A sample that is not steady cornering ends the open segment. */
  endSegment(): void {
    if (this.segBand < 0) return;
    const g = this.seg;
    g[0] = this.segBand;
    if (this.segs.length < (this.segCount + 1) * SEG_STRIDE) {
      const grown = new Float64Array(this.segs.length * 2);
      grown.set(this.segs);
      this.segs = grown;
    }
    this.segs.set(g, this.segCount * SEG_STRIDE);
    this.segCount++;
    g.fill(0);
    this.segBand = -1;
  }

  /** Appends the segments of a later part of the log (split.ts). */
  appendSegments(segs: Float64Array): void {
    this.endSegment();
    const count = segs.length / SEG_STRIDE;
    if (this.segs.length < (this.segCount + count) * SEG_STRIDE) {
      const grown = new Float64Array((this.segCount + count) * SEG_STRIDE * 2);
      grown.set(this.segs.subarray(0, this.segCount * SEG_STRIDE));
      this.segs = grown;
    }
    this.segs.set(segs, this.segCount * SEG_STRIDE);
    this.segCount += count;
  }

  /** The closed segments as one array (for a part's result). */
  segments(): Float64Array {
    this.endSegment();
    return this.segs.slice(0, this.segCount * SEG_STRIDE);
  }

  /** End of a time block: segments are cut here; the block's straight-line mean joins the offset sums. */
  closeBlock(minSamples: number): void {
    this.endSegment();
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
  /** Segments of steady cornering the gradient rests on. */
  segments: number;
  peak_lat_g: number;
  upper_gate_g: number;
  left_samples: number;
  right_samples: number;
}

/**
 * K for one band with the offset removed (offset in steering-wheel deg, δ_road = δ_sw/N): every
 * sample of the band's segments whose mean |ay| is at most `maxFraction`·peak. The interval comes
 * from the segment means, each weighted by its samples (a segment is one cluster of autocorrelated
 * samples): s² = Σ n_s·(ū_s − K·ā_s)² / (S − 1), se(K)² = s² / Σ n_s·ā_s². Null when no sample passes.
 */
export function bandUndersteer(acc: UndersteerAccumulator, band: number, offsetRoadDeg: number, maxFraction: number): BandUndersteer | null {
  acc.endSegment();
  const peak = robustPeakG(acc.cells, band, acc.peakAyG[band]);
  const upper = maxFraction * peak;
  const o = offsetRoadDeg;
  let n = 0, sa = 0, saa = 0, sau = 0, su = 0, suu = 0, segments = 0;
  let wAA = 0, wAU = 0, wUU = 0;
  const g = acc.segs;
  for (let i = 0; i < acc.segCount; i++) {
    const b = i * SEG_STRIDE;
    if (g[b] !== band) continue;
    const m = g[b + 1];
    if (!(g[b + 7] / m <= upper + 1e-12)) continue;
    n += m; sa += g[b + 2]; saa += g[b + 3]; sau += g[b + 4]; su += g[b + 5]; suu += g[b + 6];
    segments++;
    const a = g[b + 2] / m, u = g[b + 5] / m - o;
    wAA += m * a * a; wAU += m * a * u; wUU += m * u * u;
  }
  if (n === 0) return null;
  // u = u_raw − o:  Σa·u = Σa·u_raw − o·Σa ;  Σu² = Σu_raw² − 2oΣu_raw + o²n
  const fit = fitThroughOrigin(n, saa, sau - o * sa, suu - 2 * o * su + o * o * n);
  if (!fit) return null;
  let ci: [number, number] | null = null;
  if (segments >= 3 && wAA > 0) {
    const rss = Math.max(0, wUU - 2 * fit.slope * wAU + fit.slope * fit.slope * wAA);
    ci = interval95(fit.slope, Math.sqrt(rss / (segments - 1) / wAA), segments - 1);
  }
  // Direction counts are kept per band: a fair proxy for "both directions present".
  return { k_deg_per_g: fit.slope, ci95_deg_per_g: ci, samples: n, segments, peak_lat_g: peak, upper_gate_g: upper, left_samples: acc.left[band], right_samples: acc.right[band] };
}

/**
 * Aero load per axle: streaming sufficient statistics and the least-squares fit of
 * F_axle = [a] + [b·τ] + ClA·q  (q = ½ρV², τ = seconds since the first sample, taken as the
 * mean time of the sample's 1 s block in the cross terms).
 *
 * - a: static axle load (only when static damper readings are not given; otherwise the force is
 *   already relative to static and the fit goes through the origin).
 * - b·τ: slow drift of the static load over the stint (fuel burn, pot drift), fitted on stints of
 *   two minutes or more so that it cannot bias ClA (40 L of fuel ≈ 290 N of static load).
 * The point estimate uses every gated sample; its 95 % interval comes from the same fit over
 * per-block means (samples are autocorrelated, raw counts make intervals far too narrow).
 */
import { BlockMoments } from "./aero-model";
import { solveNormalEquations } from "./regression";
import type { MultiFit } from "./regression";
import { interval95 } from "./stats";

/** Sums for regressors [1, τ, q] and responses front, rear. */
export class AxleRegressionSums {
  n = 0; st = 0; sq = 0; stt = 0; stq = 0; sqq = 0;
  sf = 0; stf = 0; sqf = 0; sff = 0;
  sr = 0; str = 0; sqr = 0; srr = 0;

  add(t: number, q: number, f: number, r: number): void {
    this.n++; this.st += t; this.sq += q; this.stt += t * t; this.stq += t * q; this.sqq += q * q;
    this.sf += f; this.stf += t * f; this.sqf += q * f; this.sff += f * f;
    this.sr += r; this.str += t * r; this.sqr += q * r; this.srr += r * r;
  }
}

/** Per speed band: sums to turn the fit into mean aero loads and ride-height figures. */
export interface BandAeroSums {
  n: Float64Array; st: Float64Array; sq: Float64Array; sf: Float64Array; sr: Float64Array;
  dampFront: Float64Array; dampRear: Float64Array;
  rhFront: Float64Array; rhFrontN: Float64Array; rhRear: Float64Array; rhRearN: Float64Array;
  /** Στ·q, Σq², Σq·ax, Σq³: the band's mean regressors of the aero models (summary-bands.ts, pooled band loads). */
  stq: Float64Array; sqq: Float64Array; sqax: Float64Array; sqqq: Float64Array;
}

const BAND_KEYS: (keyof BandAeroSums)[] = ["n", "st", "sq", "sf", "sr", "dampFront", "dampRear", "rhFront", "rhFrontN", "rhRear", "rhRearN", "stq", "sqq", "sqax", "sqqq"];

export function createBandAeroSums(bands: number): BandAeroSums {
  const out = {} as BandAeroSums;
  for (const k of BAND_KEYS) out[k] = new Float64Array(bands);
  return out;
}

/** Front ride-height bins (change from static, mm) for the balance-against-ride-height map. */
export const RH_MAP_LO_MM = -40;
export const RH_MAP_BIN_MM = 2;
export const RH_MAP_BINS = 25;

export const BAND_STRIDE = 15;
/** Per band, the current block's aero samples: n, Στ, ΣF_front, ΣF_rear, Σq (the row loop writes them). */
export const BAND_CUR_STRIDE = 5;
/** Length of the current block's sums (AeroAccumulator.cur). */
export const CUR_SUMS = 17;
/**
 * Per band, sums over the time blocks that held enough of its samples, of the block means m_f,
 * m_r, the block's mean time τ and mean dynamic pressure q: B, Σm_f, Σm_f², Σm_r, Σm_r², Σm_f·m_r,
 * Στ, Στ², Στ·m_f, Στ·m_r, Σq, Σq², Σq·m_f, Σq·m_r, Στ·q. They give the band loads' sampling spread
 * from block means (autocorrelated samples).
 */
export const BAND_BLOCK_STRIDE = 15;
const BS = BAND_STRIDE; // band stride: n, Στ, Σq, ΣF_front, ΣF_rear, Σdamp_front, Σdamp_rear, ΣRH_f, n_RH_f, ΣRH_r, n_RH_r, Στq, Σq², Σq·ax, Σq³

/**
 * Per-row work is kept to plain sums of the current time block; the time terms of the fit use the
 * block's mean time (the drift is slow, so a 1 s step is no loss) and are folded in at block end.
 */
export class AeroAccumulator {
  readonly samples = new AxleRegressionSums();
  readonly blocks = new AxleRegressionSums();
  /** Per front ride-height bin: n, Στ, Σq, ΣF_front, ΣF_rear. */
  readonly rhMap = new Float64Array(RH_MAP_BINS * 5);
  /** Band sums, stride BAND_STRIDE (the summary's row loop writes them directly). */
  readonly band: Float64Array;
  private readonly bandCount: number;
  /**
   * Current block: n, Στ, Στ², Σq, Σq², Σf, Σqf, Σf², Σr, Σqr, Σr², Σq·ax, Σax, Σh (front ride-height
   * change, mm), the samples with h, Σq³ and Σh_rear (the row loop keeps these in locals).
   */
  readonly cur = new Float64Array(CUR_SUMS);
  /** Block-mean moments for the aero models in which ClA varies (aero-model.ts). */
  readonly moments: BlockMoments;
  /** Current block per band (BAND_CUR_STRIDE) and the block-mean sums per band (BAND_BLOCK_STRIDE). */
  readonly bandCur: Float64Array;
  readonly bandBlocks: Float64Array;

  constructor(bandCount: number) {
    this.bandCount = bandCount;
    this.band = new Float64Array(bandCount * BS);
    this.bandCur = new Float64Array(bandCount * BAND_CUR_STRIDE);
    this.bandBlocks = new Float64Array(bandCount * BAND_BLOCK_STRIDE);
    this.moments = new BlockMoments(bandCount);
  }

  add(t: number, q: number, f: number, r: number, band: number, dampFront: number, dampRear: number, rhFront: number, rhRear: number, ax = 0): void {
    const c = this.cur;
    c[0]++; c[1] += t; c[2] += t * t; c[3] += q; c[4] += q * q; c[5] += f; c[6] += q * f; c[7] += f * f; c[8] += r; c[9] += q * r; c[10] += r * r;
    if (band < 0) return;
    const bc = this.bandCur, oc = band * BAND_CUR_STRIDE;
    bc[oc]++; bc[oc + 1] += t; bc[oc + 2] += f; bc[oc + 3] += r; bc[oc + 4] += q;
    const b = this.band, o = band * BS;
    b[o]++; b[o + 1] += t; b[o + 2] += q; b[o + 3] += f; b[o + 4] += r; b[o + 5] += dampFront; b[o + 6] += dampRear;
    if (rhFront === rhFront) { b[o + 7] += rhFront; b[o + 8]++; }
    if (rhRear === rhRear) { b[o + 9] += rhRear; b[o + 10]++; }
    b[o + 11] += t * q; b[o + 12] += q * q; b[o + 13] += q * ax; b[o + 14] += q * q * q;
  }

  addRideHeight(rhChangeFrontMm: number, t: number, q: number, f: number, r: number): void {
    const bin = Math.floor((rhChangeFrontMm - RH_MAP_LO_MM) * (1 / RH_MAP_BIN_MM));
    if (!(bin >= 0 && bin < RH_MAP_BINS)) return;
    const o = bin * 5, m = this.rhMap;
    m[o]++; m[o + 1] += t; m[o + 2] += q; m[o + 3] += f; m[o + 4] += r;
  }

  /** End of a time block: fold its sums in; its mean enters the block-level sums when it holds enough samples. */
  closeBlock(minSamples: number): void {
    const c = this.cur;
    const n = c[0];
    if (n > 0) {
      const s = this.samples, tb = c[1] / n;
      s.n += n; s.st += c[1]; s.stt += c[2]; s.sq += c[3]; s.stq += tb * c[3]; s.sqq += c[4];
      s.sf += c[5]; s.stf += tb * c[5]; s.sqf += c[6]; s.sff += c[7];
      s.sr += c[8]; s.str += tb * c[8]; s.sqr += c[9]; s.srr += c[10];
      if (n >= minSamples) this.blocks.add(tb, c[3] / n, c[5] / n, c[8] / n);
      this.moments.addBlock(n, c[1], c[3], c[4], c[11], c[15], c[12], c[5], c[8], c[13], c[14], c[16], this.bandCur, BAND_CUR_STRIDE, 4, n >= minSamples);
    }
    c.fill(0);
    const bc = this.bandCur, bb = this.bandBlocks;
    for (let b = 0; b < this.bandCount; b++) {
      const oc = b * BAND_CUR_STRIDE, nb = bc[oc];
      if (nb >= minSamples) {
        const t = bc[oc + 1] / nb, mf = bc[oc + 2] / nb, mr = bc[oc + 3] / nb, o = b * BAND_BLOCK_STRIDE;
        bb[o]++; bb[o + 1] += mf; bb[o + 2] += mf * mf; bb[o + 3] += mr; bb[o + 4] += mr * mr; bb[o + 5] += mf * mr;
        bb[o + 6] += t; bb[o + 7] += t * t; bb[o + 8] += t * mf; bb[o + 9] += t * mr;
        const qb = bc[oc + 4] / nb;
        bb[o + 10] += qb; bb[o + 11] += qb * qb; bb[o + 12] += qb * mf; bb[o + 13] += qb * mr; bb[o + 14] += t * qb;
      }
    }
    bc.fill(0);
  }

  /**
   * Sampling spread of one band's mean axle loads from its block means, the fitted drift taken out
   * of each (u = m − drift·τ) and the part that follows the block's dynamic pressure too (the aero
   * load rises with q across a band: the same q in the truth, not an error of the mean): the number
   * of blocks and the residual variances and covariance of u_f, u_r about their line in q. The
   * fit's intercept is common to every sample of the band and is not part of this spread.
   */
  bandBlockSpread(band: number, driftFront: number, driftRear: number): { blocks: number; varF: number; varR: number; cov: number } {
    const bb = this.bandBlocks, o = band * BAND_BLOCK_STRIDE, B = bb[o];
    if (B < 3) return { blocks: B, varF: NaN, varR: NaN, cov: NaN };
    const [sf, sff, sr, srr, sfr, st, stt, stf, str, sq, sqq, sqf, sqr, stq] = [bb[o + 1], bb[o + 2], bb[o + 3], bb[o + 4], bb[o + 5], bb[o + 6], bb[o + 7], bb[o + 8], bb[o + 9], bb[o + 10], bb[o + 11], bb[o + 12], bb[o + 13], bb[o + 14]];
    const df = driftFront, dr = driftRear;
    const uf = (sf - df * st) / B, ur = (sr - dr * st) / B, qm = sq / B;
    // Centred sums of squares and products (B − 1 times the sample (co)variances).
    const cff = sff - 2 * df * stf + df * df * stt - B * uf * uf;
    const crr = srr - 2 * dr * str + dr * dr * stt - B * ur * ur;
    const cfr = sfr - dr * stf - df * str + df * dr * stt - B * uf * ur;
    const cqq = sqq - B * qm * qm;
    const cqf = sqf - df * stq - B * qm * uf, cqr = sqr - dr * stq - B * qm * ur;
    // Residuals about the line in q (one more degree of freedom used); without spread in q, about the mean.
    const k = cqq > 1e-9 * (sqq + 1) ? 1 / cqq : 0;
    const dof = k > 0 ? B - 2 : B - 1;
    const varF = (cff - cqf * cqf * k) / dof, varR = (crr - cqr * cqr * k) / dof, cov = (cfr - cqf * cqr * k) / dof;
    return { blocks: B, varF: Math.max(0, varF), varR: Math.max(0, varR), cov };
  }

  /** Band sums as named arrays (for the end of the session). */
  get bands(): BandAeroSums {
    const out = createBandAeroSums(this.bandCount);
    for (let b = 0; b < this.bandCount; b++) BAND_KEYS.forEach((k, i) => (out[k][b] = this.band[b * BS + i]));
    return out;
  }
}

export interface AxleFit {
  cla_m2: number;
  cla_se_m2: number;
  cla_ci95_m2: [number, number] | null;
  /** Static axle load relative to the reference (N); 0 when fitted through the origin. */
  intercept_n: number;
  drift_n_per_s: number;
  drift_se_n_per_s: number;
  /**
   * Block-fit (co)variances of the intercept and drift (0 for terms not fitted): the fitted static
   * load at τ, intercept + drift·τ, is common to every sample at that time (see offsetVariance).
   */
  offset_cov: { aa: number; bb: number; ab: number };
  residual_sd_n: number;
}

export interface AeroFit {
  with_intercept: boolean;
  /** The drift was fitted. */
  with_drift: boolean;
  /** The drift is a given fuel burn (not fitted). */
  drift_given: boolean;
  samples: number;
  blocks: number;
  front: AxleFit;
  rear: AxleFit;
}

/** Column subset of [1, τ, q] for the chosen model. */
function columns(withIntercept: boolean, withDrift: boolean): number[] {
  const cols: number[] = [];
  if (withIntercept) cols.push(0);
  if (withDrift) cols.push(1);
  cols.push(2);
  return cols;
}

/**
 * Least squares on the chosen columns. `knownDrift` (N/s): a drift that is known (a given fuel burn)
 * is taken out of the response first, y' = y − d·τ, and not fitted.
 */
function axleFit(s: AxleRegressionSums, cols: number[], rear: boolean, knownDrift = 0): MultiFit | null {
  const xx = [
    [s.n, s.st, s.sq],
    [s.st, s.stt, s.stq],
    [s.sq, s.stq, s.sqq],
  ];
  const d = knownDrift;
  const [sy, sty, sqy, syy] = rear ? [s.sr, s.str, s.sqr, s.srr] : [s.sf, s.stf, s.sqf, s.sff];
  const xy = [sy - d * s.st, sty - d * s.stt, sqy - d * s.stq];
  const yy = syy - 2 * d * sty + d * d * s.stt;
  const k = cols.length;
  const xtx = new Float64Array(k * k);
  const xty = new Float64Array(k);
  cols.forEach((ci, i) => {
    xty[i] = xy[ci];
    cols.forEach((cj, j) => (xtx[i * k + j] = xx[ci][cj]));
  });
  return solveNormalEquations(xtx, xty, yy, s.n, k);
}

function offsetCov(cov: Float64Array | null, k: number, ai: number, ti: number): AxleFit["offset_cov"] {
  if (!cov) return { aa: 0, bb: 0, ab: 0 };
  return { aa: ai >= 0 ? cov[ai * k + ai] : 0, bb: ti >= 0 ? cov[ti * k + ti] : 0, ab: ai >= 0 && ti >= 0 ? cov[ai * k + ti] : 0 };
}

/** Variance (N²) of an axle's fitted static load at τ (s): Var(a + b·τ) = σ²_a + τ²σ²_b + 2τ·σ_ab. */
export function offsetVariance(fit: AxleFit, tauS: number): number {
  const c = fit.offset_cov;
  const v = c.aa + tauS * tauS * c.bb + 2 * tauS * c.ab;
  return Number.isFinite(v) ? Math.max(0, v) : 0;
}

/**
 * Fit both axles; null when the samples cannot support the model. With `knownDrift` (N/s per axle,
 * a given fuel burn) the drift is that and is not fitted (`withDrift` is then ignored).
 */
export function fitAero(acc: AeroAccumulator, withIntercept: boolean, withDrift: boolean, knownDrift: { front: number; rear: number } | null = null): AeroFit | null {
  if (knownDrift) withDrift = false;
  const cols = columns(withIntercept, withDrift);
  const k = cols.length;
  const qi = k - 1;
  const ti = withDrift ? (withIntercept ? 1 : 0) : -1;
  const result: Partial<Record<"front" | "rear", AxleFit>> = {};
  for (const side of ["front", "rear"] as const) {
    const known = knownDrift ? knownDrift[side] : 0;
    const fit = axleFit(acc.samples, cols, side === "rear", known);
    const blockFit = axleFit(acc.blocks, cols, side === "rear", known);
    if (!fit) return null;
    const se = blockFit ? blockFit.se[qi] : NaN;
    result[side] = {
      cla_m2: fit.beta[qi],
      cla_se_m2: se,
      cla_ci95_m2: blockFit ? interval95(fit.beta[qi], se, blockFit.df) : null,
      intercept_n: withIntercept ? fit.beta[0] : 0,
      drift_n_per_s: ti >= 0 ? fit.beta[ti] : known,
      drift_se_n_per_s: ti >= 0 && blockFit ? blockFit.se[ti] : knownDrift ? 0 : NaN,
      offset_cov: offsetCov(blockFit?.cov ?? null, k, withIntercept ? 0 : -1, ti),
      residual_sd_n: Math.sqrt(fit.rss / Math.max(1, fit.df)),
    };
  }
  return { with_intercept: withIntercept, with_drift: withDrift, drift_given: knownDrift !== null, samples: acc.samples.n, blocks: acc.blocks.n, front: result.front!, rear: result.rear! };
}

/** Mean aero load of a band (N) from the band sums and an axle fit. */
export function bandAeroLoadN(n: number, sumT: number, sumF: number, fit: AxleFit): number {
  return n > 0 ? sumF / n - fit.intercept_n - (fit.drift_n_per_s * sumT) / n : NaN;
}

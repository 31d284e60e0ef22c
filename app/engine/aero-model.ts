/**
 * Aero models in which ClA may vary with the state of the car, fitted on 1 s block means.
 *
 * Each axle's load (relative to static, load transfer corrected) is
 *   F = [a] + [b·τ] + aero(q, state),
 * with the static load a (fitted when the car file gives no static readings) and its drift b·τ (a
 * given fuel burn, else fitted on long stints) shared by every model, and three aero terms:
 * - constant:    ClA·q;
 * - speed_band:  ClA_band·q, one ClA per speed band (bands with few blocks join their neighbour);
 * - ride_height: (c0 + c1·h)·q, ClA linear in the front ride-height change h (mm from static);
 * - ride_height_front_rear: (c0 + c1·h + c2·h_r)·q, ClA linear in both axles' ride-height changes
 *   (a diffuser or rear floor in ground effect too; pitch under braking and acceleration moves the
 *   two apart, which is what tells c1 from c2).
 *
 * The ride-height regressor is the first-stage prediction of h from q, ax and τ (two-stage least
 * squares; Wooldridge, Introductory Econometrics, ch. 15, from memory): the ride height read off the same dampers
 * as the load carries the load's own noise (a spring: F ≈ −k·h), and regressing F on q·h directly
 * would pull c1 towards the spring line. The prediction keeps only what speed, braking and fuel do.
 *
 * The model is chosen by the Bayesian information criterion (Schwarz, Annals of Statistics 6, 1978, from memory)
 * on the block means of both axles, BIC = Σ_axle B·ln(RSS_axle/B) + k·ln(B): lower is better, and a
 * model must earn its extra parameters. Block means, not samples, because samples are autocorrelated
 * and a sample-level criterion would always choose the largest model.
 *
 * The regression on block means is exact for these models: each is linear in its regressors, so a
 * block's mean load is the model at the block's mean regressors. Point estimates weight each block by
 * its sample count (as the sample-level fit would); intervals and the criterion use blocks with
 * enough samples, unweighted.
 */
import { solveNormalEquations } from "./regression";
import type { MultiFit } from "./regression";

/** Columns of the block-moment matrix (per block: the mean of each quantity over the block's aero samples). */
export const M_ONE = 0, M_TAU = 1, M_Q = 2, M_TQ = 3, M_QQ = 4, M_QAX = 5, M_QQQ = 6, M_F = 7, M_R = 8, M_BAND = 9;
/** First-stage moments: [1, τ, q, ax, q², h_front, h_rear] per block with ride heights on every sample. */
const FS = 7;
const FS_X = 5;
const FS_H = 5, FS_HR = 6;

export type AeroVariation = "constant" | "speed_band" | "ride_height" | "ride_height_front_rear";

export class BlockMoments {
  readonly dim: number;
  /** Σ n·z·zᵀ over blocks (z the block's means), point estimates. */
  readonly weighted: Float64Array;
  /** Σ z·zᵀ over blocks with enough samples, intervals and model choice. */
  readonly blocks: Float64Array;
  /** First stage Σ z·zᵀ with z = [1, τ, q, ax, q², h_front, h_rear] (blocks with enough samples, all with ride heights). */
  readonly firstStage = new Float64Array(FS * FS);
  /** Range of block-mean front ride-height change (mm) over those blocks. */
  hMin = Infinity;
  hMax = -Infinity;
  private readonly z: Float64Array;

  constructor(readonly bandCount: number) {
    this.dim = M_BAND + bandCount;
    this.weighted = new Float64Array(this.dim * this.dim);
    this.blocks = new Float64Array(this.dim * this.dim);
    this.z = new Float64Array(this.dim);
  }

  /**
   * One block's sums: n, Στ, Σq, Σq², Σq·ax, Σq³, Σax, ΣF, ΣR, Σh (front), the samples with h, Σh (rear)
   * and Σq per band. `enough`: the block holds enough samples to count on its own.
   */
  addBlock(n: number, st: number, sq: number, sqq: number, sqax: number, sqqq: number, sax: number, sf: number, sr: number, sh: number, nh: number, shr: number, bandQ: Float64Array, bandStride: number, bandQOffset: number, enough: boolean): void {
    if (!(n > 0)) return;
    const z = this.z, d = this.dim, inv = 1 / n;
    const tau = st * inv, q = sq * inv;
    z[M_ONE] = 1; z[M_TAU] = tau; z[M_Q] = q; z[M_TQ] = tau * q; z[M_QQ] = sqq * inv; z[M_QAX] = sqax * inv; z[M_QQQ] = sqqq * inv; z[M_F] = sf * inv; z[M_R] = sr * inv;
    for (let b = 0; b < this.bandCount; b++) z[M_BAND + b] = bandQ[b * bandStride + bandQOffset] * inv;
    const w = this.weighted, u = this.blocks;
    for (let i = 0; i < d; i++) {
      const zi = z[i];
      if (zi === 0) continue;
      for (let j = 0; j < d; j++) {
        const p = zi * z[j];
        w[i * d + j] += n * p;
        if (enough) u[i * d + j] += p;
      }
    }
    if (enough && nh === n) {
      const h = sh * inv;
      const f = [1, tau, q, sax * inv, sqq * inv, h, shr * inv];
      const m = this.firstStage;
      for (let i = 0; i < FS; i++) for (let j = 0; j < FS; j++) m[i * FS + j] += f[i] * f[j];
      if (h < this.hMin) this.hMin = h;
      if (h > this.hMax) this.hMax = h;
    }
  }

  /** Plain data for the parts of a split run (see split.ts), and back. */
  state(): { weighted: number[]; blocks: number[]; firstStage: number[]; hMin: number; hMax: number } {
    return { weighted: Array.from(this.weighted), blocks: Array.from(this.blocks), firstStage: Array.from(this.firstStage), hMin: this.hMin, hMax: this.hMax };
  }

  absorb(s: ReturnType<BlockMoments["state"]>): void {
    for (let i = 0; i < this.weighted.length; i++) { this.weighted[i] += s.weighted[i]; this.blocks[i] += s.blocks[i]; }
    for (let i = 0; i < this.firstStage.length; i++) this.firstStage[i] += s.firstStage[i];
    this.hMin = Math.min(this.hMin, s.hMin);
    this.hMax = Math.max(this.hMax, s.hMax);
  }

  /** Number of blocks with enough samples. */
  get blockCount(): number {
    return this.blocks[0];
  }
}

/** A regressor as a combination of moment columns. */
type Column = Float64Array;

function unit(dim: number, i: number): Column {
  const c = new Float64Array(dim);
  c[i] = 1;
  return c;
}

/** cᵀ·M·d */
function quad(m: Float64Array, dim: number, c: Column, d: Column): number {
  let s = 0;
  for (let i = 0; i < dim; i++) {
    if (c[i] === 0) continue;
    let row = 0;
    for (let j = 0; j < dim; j++) if (d[j] !== 0) row += m[i * dim + j] * d[j];
    s += c[i] * row;
  }
  return s;
}

function regress(m: Float64Array, dim: number, cols: Column[], y: Column, n: number): MultiFit | null {
  const k = cols.length;
  const xtx = new Float64Array(k * k), xty = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    xty[i] = quad(m, dim, cols[i], y);
    for (let j = 0; j < k; j++) xtx[i * k + j] = quad(m, dim, cols[i], cols[j]);
  }
  return solveNormalEquations(xtx, xty, quad(m, dim, y, y), n, k);
}

export interface ModelAxle {
  /** Static load relative to the reference (N) and its drift (N/s); 0 when not fitted. */
  intercept_n: number;
  drift_n_per_s: number;
  /** Block-fit (co)variances of intercept and drift, as AxleFit.offset_cov. */
  offset_cov: { aa: number; bb: number; ab: number };
  /** The aero coefficients (model-specific order) and their block-fit covariance. */
  beta: number[];
  cov: number[];
  rss: number;
}

export interface ModelFit {
  variation: AeroVariation;
  front: ModelAxle;
  rear: ModelAxle;
  /** Parameters over both axles, and the criterion (null when the block fit cannot be solved). */
  parameters: number;
  bic: number | null;
  /** speed_band: which bands share each ClA (indices into the bands). */
  groups?: number[][];
  /** ride_height: the front ride height's first stage, ĥ = π·[1, τ, q, ax, q²] (mm of damper-side travel). */
  firstStage?: number[];
  /** ride_height_front_rear: the rear ride height's first stage, as firstStage. */
  firstStageRear?: number[];
}

export interface ModelSpec {
  withIntercept: boolean;
  withDrift: boolean;
  knownDrift: { front: number; rear: number } | null;
  /** Blocks per band (with enough samples), to join thin bands to a neighbour. */
  bandBlocks: number[];
  minBandBlocks: number;
}

/** Speed-band groups: a band with too few blocks joins the next one (the last joins the one before). */
export function bandGroups(bandBlocks: number[], minBlocks: number): number[][] {
  const used = bandBlocks.map((b, i) => (b > 0 ? i : -1)).filter((i) => i >= 0);
  const groups: number[][] = [];
  let cur: number[] = [], count = 0;
  for (const i of used) {
    cur.push(i); count += bandBlocks[i];
    if (count >= minBlocks) { groups.push(cur); cur = []; count = 0; }
  }
  if (cur.length) {
    if (groups.length) groups[groups.length - 1].push(...cur);
    else groups.push(cur);
  }
  return groups;
}

/**
 * First stage: h̄ = π·[1, τ, q, ax, q²] over blocks (q² because the aero that lowers the nose grows
 * as the nose drops), for the front (`col` FS_H) or rear (FS_HR) ride height; null without enough
 * blocks or spread.
 */
function firstStage(m: BlockMoments, col: number): number[] | null {
  const fs = m.firstStage;
  const n = fs[0];
  if (n < 20) return null;
  const k = FS_X;
  const xtx = new Float64Array(k * k), xty = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    xty[i] = fs[i * FS + col];
    for (let j = 0; j < k; j++) xtx[i * k + j] = fs[i * FS + j];
  }
  const fit = solveNormalEquations(xtx, xty, fs[col * FS + col], n, k);
  return fit ? Array.from(fit.beta) : null;
}

/** The regressor q·ĥ as moment columns: π0·q + πτ·τq + πq·q² + πax·q·ax + πqq·q³. */
function qTimesPrediction(dim: number, p: number[]): Column {
  const u = new Float64Array(dim);
  u[M_Q] = p[0]; u[M_TQ] = p[1]; u[M_QQ] = p[2]; u[M_QAX] = p[3]; u[M_QQQ] = p[4];
  return u;
}

/**
 * Fit one model on both axles. Returns null when the weighted fit cannot be solved (too few blocks
 * or no spread in a regressor).
 */
export function fitModel(m: BlockMoments, variation: AeroVariation, spec: ModelSpec): ModelFit | null {
  const d = m.dim;
  const base: Column[] = [];
  if (spec.withIntercept) base.push(unit(d, M_ONE));
  const fitDrift = spec.withDrift && !spec.knownDrift;
  if (fitDrift) base.push(unit(d, M_TAU));
  const aero: Column[] = [];
  let groups: number[][] | undefined;
  let pi: number[] | undefined, piRear: number[] | undefined;
  if (variation === "constant") aero.push(unit(d, M_Q));
  else if (variation === "speed_band") {
    groups = bandGroups(spec.bandBlocks, spec.minBandBlocks);
    if (groups.length < 2) return null;
    for (const g of groups) {
      const c = new Float64Array(d);
      for (const b of g) c[M_BAND + b] = 1;
      aero.push(c);
    }
  } else {
    const p = firstStage(m, FS_H);
    if (!p) return null;
    pi = p;
    aero.push(unit(d, M_Q), qTimesPrediction(d, p));
    if (variation === "ride_height_front_rear") {
      const pr = firstStage(m, FS_HR);
      if (!pr) return null;
      piRear = pr;
      aero.push(qTimesPrediction(d, pr));
    }
  }
  const cols = [...base, ...aero];
  const k = cols.length;
  const axles: Partial<Record<"front" | "rear", ModelAxle>> = {};
  let bic = 0;
  const B = m.blockCount;
  for (const side of ["front", "rear"] as const) {
    const y = unit(d, side === "front" ? M_F : M_R);
    if (spec.knownDrift) y[M_TAU] = -spec.knownDrift[side];
    const point = regress(m.weighted, d, cols, y, Math.max(B, k + 1));
    const blocks = regress(m.blocks, d, cols, y, B);
    if (!point) return null;
    const ai = spec.withIntercept ? 0 : -1, ti = fitDrift ? (spec.withIntercept ? 1 : 0) : -1;
    const cov = blocks?.cov;
    axles[side] = {
      intercept_n: ai >= 0 ? point.beta[ai] : 0,
      drift_n_per_s: ti >= 0 ? point.beta[ti] : spec.knownDrift ? spec.knownDrift[side] : 0,
      offset_cov: {
        aa: ai >= 0 && cov ? cov[ai * k + ai] : 0,
        bb: ti >= 0 && cov ? cov[ti * k + ti] : 0,
        ab: ai >= 0 && ti >= 0 && cov ? cov[ai * k + ti] : 0,
      },
      beta: Array.from(point.beta.slice(base.length)),
      cov: aeroCov(cov ?? null, k, base.length),
      rss: blocks ? blocks.rss : NaN,
    };
    bic = blocks && blocks.rss > 0 ? bic + B * Math.log(blocks.rss / B) : NaN;
  }
  const parameters = 2 * k;
  return {
    variation,
    front: axles.front!, rear: axles.rear!,
    parameters,
    bic: Number.isFinite(bic) && B > 2 * k ? bic + parameters * Math.log(B) : null,
    groups,
    firstStage: pi,
    firstStageRear: piRear,
  };
}

function aeroCov(cov: Float64Array | null, k: number, from: number): number[] {
  const out: number[] = [];
  for (let i = from; i < k; i++) for (let j = from; j < k; j++) out.push(cov ? cov[i * k + j] : NaN);
  return out;
}

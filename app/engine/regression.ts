/**
 * Least squares from sufficient statistics, so the streaming summary never keeps the samples.
 *
 * - `LineAccumulator`: y = a + b·x with centred (Welford) updates, stable when the means are large
 *   against the spread (NIST StRD Norris is the check).
 * - `fitThroughOrigin`: y = b·x from Σxx, Σxy, Σyy (NIST StRD NoInt1 is the check).
 * - `solveNormalEquations`: small multiple regression (k ≤ 4) from XᵀX, Xᵀy, yᵀy.
 */

export interface LineFit {
  n: number;
  intercept: number;
  slope: number;
  r2: number;
  /** Standard errors from the residual variance (valid for independent samples only). */
  intercept_se: number;
  slope_se: number;
  residual_sd: number;
}

export class LineAccumulator {
  n = 0;
  meanX = 0;
  meanY = 0;
  cxx = 0;
  cxy = 0;
  cyy = 0;

  add(x: number, y: number): void {
    const n = ++this.n;
    const dx = x - this.meanX;
    const dy = y - this.meanY;
    this.meanX += dx / n;
    this.meanY += dy / n;
    const dy2 = y - this.meanY;
    this.cxx += dx * (x - this.meanX);
    this.cxy += dx * dy2;
    this.cyy += dy * dy2;
  }

  fit(): LineFit | null {
    const { n, cxx, cxy, cyy } = this;
    if (n < 3 || !(cxx > 0)) return null;
    const slope = cxy / cxx;
    const intercept = this.meanY - slope * this.meanX;
    const rss = Math.max(0, cyy - slope * cxy);
    const s2 = rss / (n - 2);
    return {
      n,
      intercept,
      slope,
      r2: cyy > 0 ? (cxy * cxy) / (cxx * cyy) : 1,
      slope_se: Math.sqrt(s2 / cxx),
      intercept_se: Math.sqrt(s2 * (1 / n + (this.meanX * this.meanX) / cxx)),
      residual_sd: Math.sqrt(s2),
    };
  }
}

export function fitLine(xs: ArrayLike<number>, ys: ArrayLike<number>): LineFit | null {
  const acc = new LineAccumulator();
  for (let i = 0; i < xs.length; i++) acc.add(xs[i], ys[i]);
  return acc.fit();
}

export interface OriginFit {
  n: number;
  slope: number;
  slope_se: number;
  residual_sd: number;
  /** Uncentred R² (the one quoted for regressions through the origin). */
  r2: number;
}

export function fitThroughOrigin(n: number, sxx: number, sxy: number, syy: number): OriginFit | null {
  if (n < 2 || !(sxx > 0)) return null;
  const slope = sxy / sxx;
  const rss = Math.max(0, syy - slope * sxy);
  const s2 = rss / (n - 1);
  return { n, slope, slope_se: Math.sqrt(s2 / sxx), residual_sd: Math.sqrt(s2), r2: syy > 0 ? 1 - rss / syy : 1 };
}

export function fitThroughOriginArrays(xs: ArrayLike<number>, ys: ArrayLike<number>): OriginFit | null {
  let sxx = 0, sxy = 0, syy = 0;
  for (let i = 0; i < xs.length; i++) {
    sxx += xs[i] * xs[i];
    sxy += xs[i] * ys[i];
    syy += ys[i] * ys[i];
  }
  return fitThroughOrigin(xs.length, sxx, sxy, syy);
}

/** Solve A·x = b (A k×k row-major, copied) by Gaussian elimination with partial pivoting; null if singular. */
export function solveLinearSystem(a: ArrayLike<number>, b: ArrayLike<number>, k: number): Float64Array | null {
  const m = Float64Array.from(a as ArrayLike<number>);
  const x = Float64Array.from(b as ArrayLike<number>);
  const scale = Math.max(...Array.from(m, Math.abs)) || 1;
  for (let col = 0; col < k; col++) {
    let piv = col;
    for (let r = col + 1; r < k; r++) if (Math.abs(m[r * k + col]) > Math.abs(m[piv * k + col])) piv = r;
    if (Math.abs(m[piv * k + col]) <= 1e-13 * scale) return null;
    if (piv !== col) {
      for (let c = 0; c < k; c++) [m[col * k + c], m[piv * k + c]] = [m[piv * k + c], m[col * k + c]];
      [x[col], x[piv]] = [x[piv], x[col]];
    }
    for (let r = 0; r < k; r++) {
      if (r === col) continue;
      const f = m[r * k + col] / m[col * k + col];
      if (f === 0) continue;
      for (let c = col; c < k; c++) m[r * k + c] -= f * m[col * k + c];
      x[r] -= f * x[col];
    }
  }
  for (let r = 0; r < k; r++) x[r] /= m[r * k + r];
  return x;
}

export interface MultiFit {
  beta: Float64Array;
  /** Standard errors of beta from the residual variance. */
  se: Float64Array;
  /** Covariance matrix of beta (k×k, row-major): s²·(XᵀX)⁻¹. */
  cov: Float64Array;
  rss: number;
  df: number;
}

/**
 * OLS from sums: xtx (k×k), xty (k), yty, n. Standardises the columns first so regressors of very
 * different size (a constant, seconds, pascals) do not spoil the pivoting.
 */
export function solveNormalEquations(xtx: ArrayLike<number>, xty: ArrayLike<number>, yty: number, n: number, k: number): MultiFit | null {
  if (n <= k) return null;
  const d = new Float64Array(k);
  for (let i = 0; i < k; i++) d[i] = xtx[i * k + i] > 0 ? 1 / Math.sqrt(xtx[i * k + i]) : 0;
  if (d.some((v) => v === 0)) return null;
  const a = new Float64Array(k * k);
  const b = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    b[i] = xty[i] * d[i];
    for (let j = 0; j < k; j++) a[i * k + j] = xtx[i * k + j] * d[i] * d[j];
  }
  const z = solveLinearSystem(a, b, k);
  if (!z) return null;
  const beta = z.map((v, i) => v * d[i]);
  let fitted = 0;
  for (let i = 0; i < k; i++) fitted += beta[i] * xty[i];
  const rss = Math.max(0, yty - fitted);
  const df = n - k;
  const s2 = rss / df;
  const se = new Float64Array(k);
  const cov = new Float64Array(k * k).fill(NaN);
  for (let i = 0; i < k; i++) {
    const e = new Float64Array(k);
    e[i] = 1;
    const col = solveLinearSystem(a, e, k);
    se[i] = col ? Math.sqrt(Math.max(0, s2 * col[i]) ) * d[i] : NaN;
    if (col) for (let j = 0; j < k; j++) cov[j * k + i] = s2 * col[j] * d[i] * d[j];
  }
  return { beta, se, cov, rss, df };
}

/**
 * Row passes of the streaming summary, split out of one big loop: each pass reads only the few
 * columns it needs (few live arrays, so the compiled loop keeps them in registers), and the passes
 * share per-row results through small scratch arrays. The aero pass stays in summary.ts.
 */
import { KMH_PER_M_PER_S, STANDARD_GRAVITY_M_PER_S2 } from "./units";
import type { SummaryGates } from "./summary-options";
import type { UndersteerAccumulator } from "./understeer";

// Module-local copies: a loader may turn imported bindings into getters, too slow per row.
const G = STANDARD_GRAVITY_M_PER_S2;
const INV_G = 1 / G;
const DEG_PER_RAD = 180 / Math.PI;
const RAD_PER_DEG = Math.PI / 180;

/** Row flags: the row has a time; the row opens a new time block (close the previous one first). */
export const ROW_VALID = 1;
export const ROW_NEW_BLOCK = 2;

/** Time-block bookkeeping carried from one call to the next. */
export interface TimeState {
  rows: number;
  /** Time of the log's first row (NaN until seen; preset when the log is analysed in parts). */
  t0: number;
  tLast: number;
  blockStart: number;
  blockEnd: number;
  /**
   * Time blocks owned (block index ⌊τ / blockS⌋ in [ownFrom, ownTo)); −∞ … +∞ for a whole log.
   * Rows of other blocks (a part's lead-in and run-out) get flag 0 and count nowhere.
   */
  ownFrom: number;
  ownTo: number;
  owned: boolean;
  /** A row of a block at or after ownTo has been seen. */
  passedEnd: boolean;
}

/**
 * Pass 1: τ (s since the first row), row flags and the speed band of each row (−1 outside the
 * edges); counts rows per band and sums their speed. Band i holds edge[i] ≤ v < edge[i+1].
 */
export function timeAndBandPass(
  count: number, cT: Float64Array, mV: Float64Array, blockS: number, edges: Float64Array, bandRows: Float64Array, bandSpeedSum: Float64Array,
  s: TimeState, tauOut: Float64Array, bandOut: Int32Array, flagOut: Uint8Array,
): void {
  const lastEdge = edges.length - 1, e0 = edges[0];
  let rows = s.rows, t0 = s.t0, tLast = s.tLast, blockStart = s.blockStart, blockEnd = s.blockEnd, owned = s.owned;
  const ownFrom = s.ownFrom, ownTo = s.ownTo;
  // Speed changes slowly: try the previous row's band before searching.
  let lo = Infinity, hi = -Infinity, last = -1;
  for (let j = 0; j < count; j++) {
    const t = cT[j];
    if (t !== t) { flagOut[j] = 0; bandOut[j] = -1; continue; }
    if (t0 !== t0) t0 = t;
    const tau = t - t0;
    let flag = ROW_VALID;
    if (!(tau >= blockStart && tau < blockEnd)) {
      flag = ROW_VALID | ROW_NEW_BLOCK;
      const block = Math.floor(tau / blockS);
      blockStart = block * blockS;
      blockEnd = blockStart + blockS;
      owned = block >= ownFrom && block < ownTo;
      if (block >= ownTo) s.passedEnd = true;
    }
    if (!owned) { flagOut[j] = 0; bandOut[j] = -1; continue; }
    rows++;
    tLast = t;
    tauOut[j] = tau;
    flagOut[j] = flag;
    const v = mV[j];
    let band = last;
    if (!(v >= lo && v < hi)) {
      band = -1;
      if (v >= e0) for (let e = 1; e <= lastEdge; e++) if (v < edges[e]) { band = e - 1; break; }
      last = band;
      if (band >= 0) { lo = edges[band]; hi = edges[band + 1]; } else { lo = Infinity; hi = -Infinity; }
    }
    bandOut[j] = band;
    if (band >= 0) { bandRows[band]++; bandSpeedSum[band] += v; }
  }
  s.rows = rows; s.t0 = t0; s.tLast = tLast; s.blockStart = blockStart; s.blockEnd = blockEnd; s.owned = owned;
}

/**
 * Understeer pass: quasi-steady cornering samples per band, in segments (runs of consecutive passing
 * samples); straight-line samples give the steering offset. Closes the accumulator's time block
 * (and the open segment) at each flagged row. The gates read the ≈0.2 s centred (zero-phase)
 * moving averages and their slopes (filters.ts: −3 dB near 2.2 Hz).
 */
export function understeerPass(
  count: number, flag: Uint8Array, bandOf: Int32Array,
  mV: Float64Array, mAY: Float64Array, mAX: Float64Array, mSTEER: Float64Array, mYAW: Float64Array, sSTEER: Float64Array, sAY: Float64Array,
  us: UndersteerAccumulator, g: SummaryGates, steeringRatio: number, wheelbaseM: number, blockMinUs: number,
): void {
  const usMinV = g.us_min_speed_kmh / KMH_PER_M_PER_S, straightMinV = g.straight_min_speed_kmh / KMH_PER_M_PER_S;
  const straightLat = g.straight_max_lat_g, straightRate = g.straight_max_steer_rate_deg_s, usLat = g.us_min_lat_g, usRate = g.us_max_steer_rate_deg_s;
  const usJerk = g.us_max_lat_jerk_g_s * G, usLongMs2 = g.us_max_long_g * G;
  const ratio = steeringRatio, invRatio = 1 / ratio, geomPerKappa = DEG_PER_RAD * wheelbaseM;
  for (let j = 0; j < count; j++) {
    const f = flag[j];
    if (f === 0) continue;
    if (f !== ROW_VALID) us.closeBlock(blockMinUs);
    const v = mV[j];
    if (!(v >= usMinV)) { us.endSegment(); continue; }
    const steer = mSTEER[j], yaw = mYAW[j], ay = mAY[j];
    const invV = 1 / v;
    const kappa = yaw === yaw ? yaw * RAD_PER_DEG * invV : ay * invV * invV;
    const geom = geomPerKappa * kappa;
    const steerRate = Math.abs(sSTEER[j]);
    const ayG = ay * INV_G;
    const absAy = Math.abs(ayG);
    if (steer === steer && geom === geom) {
      const band = bandOf[j];
      if (((absAy < straightLat ? 1 : 0) & (steerRate < straightRate ? 1 : 0) & (v >= straightMinV ? 1 : 0)) === 1) {
        us.endSegment();
        us.addStraight(steer - ratio * geom);
      } else if (((band >= 0 ? 1 : 0) & (absAy >= usLat ? 1 : 0) & (steerRate <= usRate ? 1 : 0) & (Math.abs(sAY[j]) <= usJerk ? 1 : 0) & (Math.abs(mAX[j]) <= usLongMs2 ? 1 : 0)) === 1) {
        const road = steer * invRatio;
        us.addCorner(band, ayG, road - geom);
      } else us.endSegment();
    } else us.endSegment();
  }
}

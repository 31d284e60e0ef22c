/**
 * The row loop's aero pass (stage 1 of the summary, with summary-rows.ts): per smoothed row, the
 * axle forces from damper travel (springs, bump stops, longitudinal load transfer), the static
 * estimate from slow running, the bump-stop contact histogram, and the gated aero
 * sums. Plain indexed arithmetic on typed arrays; the per-row path allocates nothing.
 */
import { BAND_CUR_STRIDE, BAND_STRIDE } from "./aero";
import type { BlockSmoother } from "./filters";
import { bumpStopForceN, dynamicPressurePa, frontLoadTransferN, wheelForceChangeN } from "./physics";
import { addStaticSample, CONTACT_BIN_MM, CONTACT_BINS, CONTACT_LO_MM, CONTACT_SLOTS, staticEstimate } from "./static-estimate";
import type { SummaryState } from "./summary-state";
import { ROW_VALID } from "./summary-rows";
import { KMH_PER_M_PER_S, STANDARD_GRAVITY_M_PER_S2 } from "./units";

// Module-local copies: a loader may turn imported bindings into getters, too slow per row. The
// physics is physics.ts's own functions (the ones tests check against textbook formulas), not copies.
const G = STANDARD_GRAVITY_M_PER_S2;
const springForceN = wheelForceChangeN, loadTransferFrontN = frontLoadTransferN, qPa = dynamicPressurePa, stopForceN = bumpStopForceN;
const KMH = KMH_PER_M_PER_S;
const NO_CURVE = new Float64Array(2);
// The contact histogram's layout (static-estimate.ts contactSlot, inlined in the row loop).
const C_LO = CONTACT_LO_MM, C_PER_MM = 1 / CONTACT_BIN_MM, C_BINS = CONTACT_BINS, C_SLOTS = CONTACT_SLOTS;

/**
 * Smoother slots. Speed and long acceleration are smoothed like the dampers (so q and the
 * load-transfer correction line up in time with the damper signal); lateral acceleration, steering
 * and yaw rate get the longer ≈0.2 s smoothing of the understeer gates.
 */
export const T = 0, V = 1, AY = 2, AX = 3, STEER = 4, DFL = 5, DFR = 6, DRL = 7, DRR = 8, RHF = 9, RHR = 10, YAW = 11;
export const SLOT_CHANNELS = ["time", "speed", "lat_accel", "long_accel", "steer", "damper_fl", "damper_fr", "damper_rl", "damper_rr", "ride_height_front", "ride_height_rear", "yaw_rate"] as const;

/** Per-row results shared between the passes of one call (sized by the caller). */
export interface RowScratch {
  tau: Float64Array;
  band: Int32Array;
  flag: Uint8Array;
  /** Axle forces (N) from the dampers, NaN where unknown: the traces take them. */
  ff: Float64Array;
  fr: Float64Array;
}

/** The aero pass over `count` smoothed rows; `blockMin`: samples a time block needs to count. */
export function aeroPass(s: SummaryState, sm: BlockSmoother, count: number, x: RowScratch, blockMin: number): void {
  const m = sm.mean, sl = sm.slope, ce = sm.centre;
  const mV = m[V], mAY = m[AY], mAX = m[AX];
  const mFL = m[DFL], mFR = m[DFR], mRL = m[DRL], mRR = m[DRR], mRHF = m[RHF], mRHR = m[RHR];
  const sFL = sl[DFL], sFR = sl[DFR], sRL = sl[DRL], sRR = sl[DRR];
  const cFL = ce[DFL], cFR = ce[DFR], cRL = ce[DRL], cRR = ce[DRR];
  const g = s.opts.gates;
  const c = s.model;
  const rho = s.air.density_kg_m3;
  const aeroMinV = g.aero_min_speed_kmh / KMH, aeroMaxAx = g.aero_max_long_g * G, vmax = g.aero_max_damper_velocity_mm_s, spike = g.aero_max_spike_mm;
  const st = c.staticDamperMm;
  const massKg = c.massKg, cogM = c.cogHeightM, wheelbaseM = c.wheelbaseM;
  const ffOut = x.ff, frOut = x.fr, tauBuf = x.tau, bandBuf = x.band, flagBuf = x.flag;
  const aero = s.aero, est = s.est;
  const ksF = c.forcePerMmFront / c.motionRatioFront, ksR = c.forcePerMmRear / c.motionRatioRear;
  const gapF = c.bumpGapFrontMm, gapR = c.bumpGapRearMm, mrF = c.motionRatioFront, mrR = c.motionRatioRear;
  // Bump-stop curves (force at the damper against depth past contact); read only in contact.
  const bxF = c.bumpCurveFront?.deflectionMm ?? NO_CURVE, bfF = c.bumpCurveFront?.forceN ?? NO_CURVE;
  const bxR = c.bumpCurveRear?.deflectionMm ?? NO_CURVE, bfR = c.bumpCurveRear?.forceN ?? NO_CURVE;
  // Linear stops: the curve's two rows from (0, 0); then force = rate·max(0, depth) = (d + |d|)·rate/2.
  const linF = bxF.length === 2 && bxF[0] === 0 && bfF[0] === 0 && bxF[1] > 0, linR = bxR.length === 2 && bxR[0] === 0 && bfR[0] === 0 && bxR[1] > 0;
  const halfRateF = linF ? (0.5 * bfF[1]) / bxF[1] : 0, halfRateR = linR ? (0.5 * bfR[1]) / bxR[1] : 0;
  const rhPerDamp = -0.5 / mrF, rhPerDampRear = -0.5 / mrR;
  const needBump = s.hasBumpStops, collectEst = !s.staticGiven, estMin = s.estMin, estMax = s.estMax;
  let estN = s.estN, refF = s.refFront, refR = s.refRear;
  // Static reference per corner: the readings when given, else the running estimate (kept in
  // plain locals, no closure: captured variables would live in a heap context inside the loop).
  const s4 = new Float64Array(4);
  let sfl = 0, sfr = 0, srl = 0, srr = 0;
  if (st) { sfl = st.fl; sfr = st.fr; srl = st.rl; srr = st.rr; }
  else if (estN > 0) { staticEstimate(est, estN, s4); sfl = s4[0]; sfr = s4[1]; srl = s4[2]; srr = s4[3]; }
  const offF = st ? st.fl + st.fr : 0, offR = st ? st.rl + st.rr : 0;
  const hist = s.contactHist;
  let waiting = 0;
  // The current block's aero sums live in locals (see AeroAccumulator.cur for the order).
  const cur = aero.cur, bs = aero.band, bc = aero.bandCur;
  let bn = cur[0], bt = cur[1], btt = cur[2], bq = cur[3], bqq = cur[4], bf = cur[5], bqf = cur[6], bff = cur[7], br = cur[8], bqr = cur[9], brr = cur[10];
  let bqa = cur[11], ba = cur[12], bh = cur[13], bhn = cur[14], bqqq = cur[15], bhr = cur[16];
  for (let j = 0; j < count; j++) {
    const flag = flagBuf[j];
    if (flag === 0) { ffOut[j] = NaN; frOut[j] = NaN; continue; }
    if (flag !== ROW_VALID) {
      cur[0] = bn; cur[1] = bt; cur[2] = btt; cur[3] = bq; cur[4] = bqq; cur[5] = bf; cur[6] = bqf; cur[7] = bff; cur[8] = br; cur[9] = bqr; cur[10] = brr; cur[11] = bqa; cur[12] = ba; cur[13] = bh; cur[14] = bhn; cur[15] = bqqq; cur[16] = bhr;
      aero.closeBlock(blockMin);
      bn = bt = btt = bq = bqq = bf = bqf = bff = br = bqr = brr = bqa = ba = bh = bhn = bqqq = bhr = 0;
    }
    const tau = tauBuf[j], band = bandBuf[j];
    const v = mV[j];
    const ax = mAX[j];
    const xfl = mFL[j], xfr = mFR[j], xrl = mRL[j], xrr = mRR[j];
    const dampersOk = xfl === xfl && xfr === xfr && xrl === xrl && xrr === xrr;
    let ff = NaN, fr = NaN;
    if (dampersOk) {
      const vFl = sFL[j], vFr = sFR[j], vRl = sRL[j], vRr = sRR[j];
      // Static estimate from slow running with no load transfer (only when readings are not given).
      if (collectEst && estN < estMax && v < 60 / KMH && v > 1 && Math.abs(ax) < 0.1 * G && Math.abs(mAY[j]) < 0.1 * G &&
        Math.abs(vFl) < 50 && Math.abs(vFr) < 50 && Math.abs(vRl) < 50 && Math.abs(vRr) < 50) {
        addStaticSample(est, qPa(rho, v), xfl, xfr, xrl, xrr); estN++;
        staticEstimate(est, estN, s4); sfl = s4[0]; sfr = s4[1]; srl = s4[2]; srr = s4[3];
      }
      const staticKnown = st !== null || estN >= estMin;
      let cf = 0, cr = 0;
      if (staticKnown || !needBump) {
        if (needBump) {
          // On the unsmoothed travel: a stop's force is convex in travel, so the force at the smoothed
          // travel misses what the wheel's quicker motion presses into the stop (the mean force is the
          // mean of the force, not the force at the mean travel).
          const cfl = cFL[j] - sfl - gapF, cfr = cFR[j] - sfr - gapF, crl = cRL[j] - srl - gapR, crr = cRR[j] - srr - gapR;
          // Stop forces at the damper, summed per axle; the wheel sees MR times that (virtual work).
          // A linear stop (a two-row curve from zero force) without branches: the raw travel crosses the
          // gap back and forth with the road, and a branch per corner would be mispredicted each time.
          if (linF) cf = (cfl + Math.abs(cfl) + cfr + Math.abs(cfr)) * halfRateF;
          else cf = (cfl > 0 ? stopForceN(cfl, bxF, bfF) : 0) + (cfr > 0 ? stopForceN(cfr, bxF, bfF) : 0);
          if (linR) cr = (crl + Math.abs(crl) + crr + Math.abs(crr)) * halfRateR;
          else cr = (crl > 0 ? stopForceN(crl, bxR, bfR) : 0) + (crr > 0 ? stopForceN(crr, bxR, bfR) : 0);
        }
        // Axle load from the springs (ΔFw = Ks·MR·Δx, summed over the axle's corners) and the stops,
        // less the longitudinal load transfer the springs carry (ΔFz,front = −m·ax·h/L).
        const lt = loadTransferFrontN(massKg, ax, cogM, wheelbaseM);
        ff = springForceN(xfl + xfr - offF, ksF, mrF) + mrF * cf - lt;
        fr = springForceN(xrl + xrr - offR, ksR, mrR) + mrR * cr + lt;
        if (st === null) {
          if (refF !== refF) { refF = ff; refR = fr; }
          ff -= refF; fr -= refR;
        }
      }
      if (needBump && staticKnown && v >= aeroMinV && Math.abs(ax) <= aeroMaxAx) {
        // Contact margin per axle: the more compressed wheel's travel from static, less the gap.
        const mf = xfl - sfl > xfr - sfr ? xfl - sfl : xfr - sfr, mr = xrl - srl > xrr - srr ? xrl - srl : xrr - srr;
        // Slot 0 below the histogram, C_BINS + 1 above it (NaN and −∞ margins land in slot 0).
        const hf = Math.floor((mf - gapF - C_LO) * C_PER_MM), hr = Math.floor((mr - gapR - C_LO) * C_PER_MM);
        hist[hf >= 0 ? (hf < C_BINS ? hf + 1 : C_BINS + 1) : 0]++;
        hist[C_SLOTS + (hr >= 0 ? (hr < C_BINS ? hr + 1 : C_BINS + 1) : 0)]++;
      }
      // Aero: gated, load-transfer-corrected samples (corners and moderate acceleration included).
      // One branch for all gates (bitwise &): noisy data makes each separate test hard to predict.
      // Each corner is tested on its own (max |x| ≤ limit ⇔ every |x| ≤ limit, NaN failing both
      // ways): no Math.max, whose NaN and −0 handling costs branches.
      const rateOk = (Math.abs(vFl) <= vmax ? 1 : 0) & (Math.abs(vFr) <= vmax ? 1 : 0) & (Math.abs(vRl) <= vmax ? 1 : 0) & (Math.abs(vRr) <= vmax ? 1 : 0);
      const spikeOk = (Math.abs(cFL[j] - xfl) <= spike ? 1 : 0) & (Math.abs(cFR[j] - xfr) <= spike ? 1 : 0) & (Math.abs(cRL[j] - xrl) <= spike ? 1 : 0) & (Math.abs(cRR[j] - xrr) <= spike ? 1 : 0);
      if (((v >= aeroMinV ? 1 : 0) & (Math.abs(ax) <= aeroMaxAx ? 1 : 0) & rateOk & spikeOk) === 1) {
        if (ff !== ff) waiting++;
        else {
          const q = qPa(rho, v);
          bn++; bt += tau; btt += tau * tau; bq += q; bqq += q * q; bf += ff; bqf += q * ff; bff += ff * ff; br += fr; bqr += q * fr; brr += fr * fr;
          bqa += q * ax; ba += ax; bqqq += q * q * q;
          if (band >= 0) {
            const o = band * BAND_STRIDE;
            const oc = band * BAND_CUR_STRIDE;
            bc[oc]++; bc[oc + 1] += tau; bc[oc + 2] += ff; bc[oc + 3] += fr; bc[oc + 4] += q;
            bs[o]++; bs[o + 1] += tau; bs[o + 2] += q; bs[o + 3] += ff; bs[o + 4] += fr; bs[o + 5] += xfl + xfr; bs[o + 6] += xrl + xrr;
            const rhf = mRHF[j], rhr = mRHR[j];
            if (rhf === rhf) { bs[o + 7] += rhf; bs[o + 8]++; }
            if (rhr === rhr) { bs[o + 9] += rhr; bs[o + 10]++; }
            bs[o + 11] += tau * q; bs[o + 12] += q * q; bs[o + 13] += q * ax; bs[o + 14] += q * q * q;
          }
          if (staticKnown) {
            const hF = (xfl + xfr - sfl - sfr) * rhPerDamp;
            bh += hF; bhn++; bhr += (xrl + xrr - srl - srr) * rhPerDampRear;
            aero.addRideHeight(hF, tau, q, ff, fr);
          }
        }
      }
    }
    ffOut[j] = ff; frOut[j] = fr;
  }
  cur[0] = bn; cur[1] = bt; cur[2] = btt; cur[3] = bq; cur[4] = bqq; cur[5] = bf; cur[6] = bqf; cur[7] = bff; cur[8] = br; cur[9] = bqr; cur[10] = brr; cur[11] = bqa; cur[12] = ba; cur[13] = bh; cur[14] = bhn; cur[15] = bqqq; cur[16] = bhr;
  s.estN = estN; s.refFront = refF; s.refRear = refR;
  s.aeroWaitingStatic += waiting;
}

/**
 * Streaming session summary: `createSummaryBuilder(car, options)`, then `push(block)` for each
 * ChannelBlock and `finish(ctx)` for the SessionSummary. Nothing of full resolution is kept: a short
 * delay line for the centred filters, sufficient statistics for the fits, decimated traces.
 * The per-row path allocates nothing.
 */
import { AeroAccumulator, BAND_CUR_STRIDE, BAND_STRIDE } from "./aero";
import type { BlockMoments } from "./aero-model";
import { bandEdgesMs } from "./bands";
import { carModel, validateCar } from "./car";
import type { CarModel } from "./car";
import { sessionAirDensity } from "./density";
import { KMH_PER_M_PER_S, STANDARD_GRAVITY_M_PER_S2 } from "./units";
import { BlockSmoother } from "./filters";
import { buildSummary } from "./summary-finish";
import type { FinishContext, SessionSummary } from "./summary-types";
import { resolveOptions } from "./summary-options";
import type { ResolvedOptions, SummaryOptions } from "./summary-options";
import { TRACE_CHANNELS, TraceDecimator } from "./summary-traces";
import type { TraceState } from "./summary-traces";
import { PartUnsafe } from "./errors";
import { bumpStopForceN } from "./physics";
import type { CarInput, ChannelBlock } from "./types";
import { UndersteerAccumulator } from "./understeer";
import { copyBlock, estimateDt } from "./summary-blocks";
import { ROW_VALID, timeAndBandPass, understeerPass } from "./summary-rows";
import { addStaticSample, CONTACT_BIN_MM, CONTACT_BINS, CONTACT_LO_MM, CONTACT_SLOTS, STATIC_SUMS, staticEstimate } from "./static-estimate";

export type { SessionSummary, FinishContext } from "./summary-types";
export { TRACE_CHANNELS } from "./summary-traces";

// Module-local copies: a loader may turn imported bindings into getters, too slow per row.
const G = STANDARD_GRAVITY_M_PER_S2;
// Reciprocal: the row loop multiplies instead of dividing (a division costs several multiplies).
const INV_G = 1 / G;
const KMH = KMH_PER_M_PER_S;
const NO_CURVE = new Float64Array(2);
// The contact histogram's layout (static-estimate.ts contactSlot, inlined in the row loop).
const C_LO = CONTACT_LO_MM, C_PER_MM = 1 / CONTACT_BIN_MM, C_BINS = CONTACT_BINS, C_SLOTS = CONTACT_SLOTS;
export type { SummaryOptions } from "./summary-options";

/**
 * The static damper reference while it is being learned from slow running (only when the car file
 * gives no static readings): the sums of static-estimate.ts, their count, and the first axle forces (the
 * reference the forces are taken from). Order matters here, so a part of a log takes it over from
 * the part before.
 */
export interface StaticSeed {
  est: number[];
  estN: number;
  refFront: number;
  refRear: number;
}

export interface StaticReference { source: "car_file" | "estimated"; fl: number; fr: number; rl: number; rr: number; samples: number }

/** One part of a log analysed on its own (see split.ts): which time blocks it owns, and what it inherits. */
export interface PartSpec {
  /** Time of the log's first row, in the engine's units (s). */
  t0: number;
  /** The log's sample interval as the whole-log run finds it (s). */
  dtS: number;
  /** Owned time blocks: index ⌊(t − t0) / blockS⌋ from `fromBlock` (inclusive) to `toBlock` (exclusive). */
  fromBlock: number;
  toBlock: number;
  seed?: StaticSeed | null;
  /** Called once the static reference can no longer change (the next part may start with it). */
  onSeed?(seed: StaticSeed): void;
}

/** Everything a part contributes to the session summary: plain data that crosses threads. */
export interface SummaryPart {
  rows: number; t0: number; tLast: number; sampleRateHz: number;
  mapped: string[];
  aeroSamples: number[]; aeroBlocks: number[]; aeroMoments: ReturnType<BlockMoments["state"]>; rhMap: Float64Array; aeroBand: Float64Array; aeroBandBlocks: Float64Array;
  usCells: Float64Array; usSegments: Float64Array; usPeakAyG: Float64Array; usLeft: Float64Array; usRight: Float64Array;
  usScalars: number[];
  sign: number[]; yawSignDot: number; yawSignN: number;
  contactHist: Float64Array; aeroWaitingStatic: number;
  bandRows: Float64Array; bandSpeedSum: Float64Array;
  seed: StaticSeed;
  traces: TraceState;
}

const SUM_KEYS = ["n", "st", "sq", "stt", "stq", "sqq", "sf", "stf", "sqf", "sff", "sr", "str", "sqr", "srr"] as const;
const US_SCALARS = ["offsetN", "offsetSum", "offsetSumSq", "offsetBlocks", "offsetBlockSum", "offsetBlockSumSq", "signDot", "signNorm"] as const;
const SIGN_KEYS = ["n", "sd", "sdd", "sa", "saa", "sad", "sf", "sdf", "sr", "sdr", "sq", "sqq", "sdq", "sqf", "sqr"] as const;

/**
 * Smoother slots. Speed and long acceleration are smoothed like the dampers (so q and the
 * load-transfer correction line up in time with the damper signal); lateral acceleration, steering
 * and yaw rate get the longer ≈0.2 s smoothing of the understeer gates.
 */
const T = 0, V = 1, AY = 2, AX = 3, STEER = 4, DFL = 5, DFR = 6, DRL = 7, DRR = 8, RHF = 9, RHR = 10, YAW = 11;
const SLOT_CHANNELS = ["time", "speed", "lat_accel", "long_accel", "steer", "damper_fl", "damper_fr", "damper_rl", "damper_rr", "ride_height_front", "ride_height_rear", "yaw_rate"] as const;

export class SummaryBuilder {
  readonly car: CarInput;
  readonly model: CarModel;
  readonly opts: ResolvedOptions;
  readonly air: ReturnType<typeof sessionAirDensity>;
  readonly edgesMs: Float64Array;
  readonly bandCount: number;
  readonly aero: AeroAccumulator;
  readonly us: UndersteerAccumulator;
  readonly traces: TraceDecimator;
  readonly bandRows: Float64Array;
  /** Σ speed (m/s) of each band's rows. */
  readonly bandSpeedSum: Float64Array;
  readonly staticGiven: boolean;
  readonly hasBumpStops: boolean;
  sampleRateHz = NaN;
  rows = 0; t0 = NaN; tLast = NaN;
  /** Channels present in the blocks (optional ones may be absent). */
  mapped = new Set<string>();
  /** Aero samples skipped while no static estimate existed for the bump-stop model. */
  aeroWaitingStatic = 0;
  /** Bump-stop contact margins of running samples, front then rear (see static-estimate.ts). */
  readonly contactHist = new Float64Array(2 * CONTACT_SLOTS);
  /** Static damper estimate from slow running without load transfer (only when readings are not given; see static-estimate.ts). */
  readonly est = new Float64Array(STATIC_SUMS); estN = 0; estMin = 0; estMax = 0;
  refFront = NaN; refRear = NaN;
  /** The static estimate per corner (scratch for staticEstimate). */
  readonly static4 = new Float64Array(4);
  /**
   * Sign checks against the rate of change of speed d = dv/dt (g), which no channel's sign can spoil:
   * sums of d, the logged ax (g), the axle damper sums and w = v²/1000 (aero load grows with it), for
   * long_accel against d and each axle's pitch under braking with the aero held apart.
   */
  readonly sign = { n: 0, sd: 0, sdd: 0, sa: 0, saa: 0, sad: 0, sf: 0, sdf: 0, sr: 0, sdr: 0, sq: 0, sqq: 0, sdq: 0, sqf: 0, sqr: 0 };
  yawSignDot = 0; yawSignN = 0;
  /** Time-block ownership (see TimeState): the whole log unless this builder runs one part of it. */
  ownFrom = -Infinity; ownTo = Infinity; owned = true; passedEnd = false;
  private readonly part: PartSpec | null;
  private seedSent = false;
  /** Delayed rows consumed so far, and the stream index of the first owned one (−1 until seen). */
  private consumed = 0;
  private firstOwned = -1;

  private sm: BlockSmoother | null = null;
  private pending: ChannelBlock[] = [];
  blockStart = 0;
  blockEnd = -1;
  private tauBuf = new Float64Array(0);
  private bandBuf = new Int32Array(0);
  private flagBuf = new Uint8Array(0);
  private blockMin = 2;
  private blockMinUs = 2;
  private ffOut = new Float64Array(0);
  private frOut = new Float64Array(0);
  private readonly traceCols: (Float64Array | null)[] = new Array(TRACE_CHANNELS.length).fill(null);
  private readonly cols: (Float64Array | null)[] = new Array(SLOT_CHANNELS.length).fill(null);

  constructor(car: CarInput, options: SummaryOptions = {}, part: PartSpec | null = null) {
    this.car = validateCar(car);
    this.model = carModel(this.car);
    this.opts = resolveOptions(options);
    this.air = sessionAirDensity(this.opts.airTempC, this.opts.airPressureHpa, this.opts.airHumidityPct);
    this.edgesMs = bandEdgesMs(this.opts.bandEdgesKmh);
    this.bandCount = this.opts.bandEdgesKmh.length - 1;
    this.aero = new AeroAccumulator(this.bandCount);
    this.us = new UndersteerAccumulator(this.bandCount);
    this.traces = new TraceDecimator(TRACE_CHANNELS, this.opts.traceBuckets);
    this.bandRows = new Float64Array(this.bandCount);
    this.bandSpeedSum = new Float64Array(this.bandCount);
    this.staticGiven = this.model.staticDamperMm !== null;
    this.hasBumpStops = this.model.bumpForcePerMmFront > 0 || this.model.bumpForcePerMmRear > 0;
    this.part = part;
    if (part) {
      this.t0 = part.t0;
      this.ownFrom = part.fromBlock;
      this.ownTo = part.toBlock;
      this.owned = false;
      if (part.seed) this.takeSeed(part.seed);
      this.start(part.dtS);
    }
  }

  /** A part's builder has consumed every row it owns (later rows are run-out only). */
  get partDone(): boolean {
    return this.passedEnd;
  }

  /** The static reference as it stands (see StaticSeed). */
  get seed(): StaticSeed {
    return { est: Array.from(this.est), estN: this.estN, refFront: this.refFront, refRear: this.refRear };
  }

  /**
   * The static damper readings (mm, as mapped): the car file's, else the slow-running estimate once it
   * has enough samples, less the damper travel that running's aero load accounts for (per axle).
   */
  staticReference(aeroTravelMm: { front: number; rear: number } = { front: 0, rear: 0 }): StaticReference | null {
    const st = this.model.staticDamperMm;
    if (st) return { source: "car_file", fl: st.fl, fr: st.fr, rl: st.rl, rr: st.rr, samples: 0 };
    if (this.estN < this.estMin) return null;
    const s4 = new Float64Array(4);
    staticEstimate(this.est, this.estN, s4);
    const f = aeroTravelMm.front, r = aeroTravelMm.rear;
    return { source: "estimated", fl: s4[0] - f, fr: s4[1] - f, rl: s4[2] - r, rr: s4[3] - r, samples: this.estN };
  }

  /** Takes over a static reference (the inverse of `seed`). */
  private takeSeed(seed: StaticSeed): void {
    this.est.set(seed.est);
    this.estN = seed.estN; this.refFront = seed.refFront; this.refRear = seed.refRear;
  }

  push(block: ChannelBlock): void {
    if (block.rows === 0) return;
    for (const k of Object.keys(block.channels)) this.mapped.add(k);
    if (!this.sm) {
      this.pending.push(copyBlock(block));
      const dt = estimateDt(this.pending);
      if (dt === null) return;
      this.start(dt);
      const queued = this.pending;
      this.pending = [];
      for (const b of queued) this.run(b);
      return;
    }
    this.run(block);
  }

  finish(ctx: FinishContext = {}): SessionSummary {
    if (!this.sm && this.pending.length) {
      this.start(estimateDt(this.pending) ?? 0.01);
      for (const b of this.pending) this.run(b);
      this.pending = [];
    }
    if (this.sm) this.consume(this.sm.flush());
    this.closeBlock();
    return buildSummary(this, ctx);
  }

  /** End of a part: its contribution as plain data (see mergeParts in split.ts). */
  finishPart(): SummaryPart {
    if (this.sm) this.consume(this.sm.flush());
    this.closeBlock();
    const a = this.aero, u = this.us;
    return {
      rows: this.rows, t0: this.t0, tLast: this.tLast, sampleRateHz: this.sampleRateHz,
      mapped: [...this.mapped],
      aeroSamples: SUM_KEYS.map((k) => a.samples[k]), aeroBlocks: SUM_KEYS.map((k) => a.blocks[k]), aeroMoments: a.moments.state(),
      rhMap: a.rhMap.slice(), aeroBand: a.band.slice(), aeroBandBlocks: a.bandBlocks.slice(),
      usCells: u.cells.slice(), usSegments: u.segments(), usPeakAyG: u.peakAyG.slice(), usLeft: u.left.slice(), usRight: u.right.slice(),
      usScalars: US_SCALARS.map((k) => u[k]),
      sign: SIGN_KEYS.map((k) => this.sign[k]), yawSignDot: this.yawSignDot, yawSignN: this.yawSignN,
      contactHist: this.contactHist.slice(), aeroWaitingStatic: this.aeroWaitingStatic,
      bandRows: this.bandRows.slice(), bandSpeedSum: this.bandSpeedSum.slice(),
      seed: this.seed,
      traces: this.traces.state(),
    };
  }

  /**
   * Folds in the parts of one log, in time order, on a builder that was given no blocks; then
   * `summarise` gives the summary. Sums add; the static reference is the last part's.
   */
  absorb(parts: readonly SummaryPart[]): void {
    const add = (into: Float64Array, from: Float64Array) => { for (let i = 0; i < into.length; i++) into[i] += from[i]; };
    const a = this.aero, u = this.us;
    parts.forEach((p, i) => {
      if (i === 0) { this.t0 = p.t0; this.sampleRateHz = p.sampleRateHz; }
      if (p.rows > 0) this.tLast = p.tLast;
      this.rows += p.rows;
      for (const m of p.mapped) this.mapped.add(m);
      SUM_KEYS.forEach((k, j) => { a.samples[k] += p.aeroSamples[j]; a.blocks[k] += p.aeroBlocks[j]; });
      a.moments.absorb(p.aeroMoments);
      add(a.rhMap, p.rhMap); add(a.band, p.aeroBand); add(a.bandBlocks, p.aeroBandBlocks);
      add(u.cells, p.usCells); u.appendSegments(p.usSegments); add(u.left, p.usLeft); add(u.right, p.usRight);
      for (let b = 0; b < u.peakAyG.length; b++) u.peakAyG[b] = Math.max(u.peakAyG[b], p.usPeakAyG[b]);
      US_SCALARS.forEach((k, j) => { u[k] += p.usScalars[j]; });
      SIGN_KEYS.forEach((k, j) => { this.sign[k] += p.sign[j]; });
      this.yawSignDot += p.yawSignDot; this.yawSignN += p.yawSignN;
      add(this.contactHist, p.contactHist); this.aeroWaitingStatic += p.aeroWaitingStatic;
      add(this.bandRows, p.bandRows); add(this.bandSpeedSum, p.bandSpeedSum);
      this.takeSeed(p.seed);
      if (i === 0) this.traces.restore(p.traces); else this.traces.append(p.traces);
    });
  }

  /** The summary of a builder that absorbed parts. */
  summarise(ctx: FinishContext = {}): SessionSummary {
    return buildSummary(this, ctx);
  }

  private start(dt: number): void {
    this.sampleRateHz = 1 / dt;
    const h1 = Math.max(1, Math.round(this.opts.damperSmoothingS / dt / 2));
    const h2 = Math.max(1, Math.round(this.opts.gateSmoothingS / dt / 2));
    const halves = SLOT_CHANNELS.map((c, i) => (i === T ? 0 : i >= DFL && i <= RHR ? h1 : i === V || i === AX ? h1 : h2));
    this.sm = new BlockSmoother(halves, dt, SLOT_CHANNELS.map((_, i) => i === V || i === AY || i === STEER || (i >= DFL && i <= DRR)));
    const perBlock = this.opts.blockS / dt;
    this.blockMin = Math.max(2, Math.round(0.25 * perBlock));
    this.blockMinUs = Math.max(2, Math.round(0.1 * perBlock));
    this.estMin = Math.max(5, Math.round(0.5 / dt));
    this.estMax = Math.round(5 / dt);
  }

  private run(block: ChannelBlock): void {
    const sm = this.sm!;
    for (let k = 0; k < SLOT_CHANNELS.length; k++) this.cols[k] = block.channels[SLOT_CHANNELS[k]] ?? null;
    this.consume(sm.push(this.cols, block.rows));
  }

  private closeBlock(): void {
    this.aero.closeBlock(this.blockMin);
    this.us.closeBlock(this.blockMinUs);
  }

  /** The per-row path: `count` delayed rows are ready in the smoother's output arrays. */
  private consume(count: number): void {
    const sm = this.sm!;
    const m = sm.mean, sl = sm.slope, ce = sm.centre;
    const cT = ce[T], mV = m[V], mAY = m[AY], mAX = m[AX], mSTEER = m[STEER], mYAW = m[YAW];
    const mFL = m[DFL], mFR = m[DFR], mRL = m[DRL], mRR = m[DRR], mRHF = m[RHF], mRHR = m[RHR];
    const sFL = sl[DFL], sFR = sl[DFR], sRL = sl[DRL], sRR = sl[DRR], sSTEER = sl[STEER], sAY = sl[AY];
    const cV = ce[V], cAY = ce[AY], cAX = ce[AX], cSTEER = ce[STEER], cFL = ce[DFL], cFR = ce[DFR], cRL = ce[DRL], cRR = ce[DRR], cRHF = ce[RHF], cRHR = ce[RHR], cYAW = ce[YAW];
    const g = this.opts.gates;
    const c = this.model;
    const rho = this.air.density_kg_m3;
    const aeroMinV = g.aero_min_speed_kmh / KMH, aeroMaxAx = g.aero_max_long_g * G, vmax = g.aero_max_damper_velocity_mm_s, spike = g.aero_max_spike_mm;
    const st = c.staticDamperMm;
    const ltPerMs2 = (c.massKg * c.cogHeightM) / c.wheelbaseM;
    if (this.ffOut.length < count) { this.ffOut = new Float64Array(count); this.frOut = new Float64Array(count); }
    const ffOut = this.ffOut, frOut = this.frOut;
    const aero = this.aero, est = this.est, sign = this.sign;
    const kF = c.forcePerMmFront, kR = c.forcePerMmRear;
    const gapF = c.bumpGapFrontMm, gapR = c.bumpGapRearMm, mrF = c.motionRatioFront, mrR = c.motionRatioRear;
    // Bump-stop curves (force at the damper against depth past contact); read only in contact.
    const bxF = c.bumpCurveFront?.deflectionMm ?? NO_CURVE, bfF = c.bumpCurveFront?.forceN ?? NO_CURVE;
    const bxR = c.bumpCurveRear?.deflectionMm ?? NO_CURVE, bfR = c.bumpCurveRear?.forceN ?? NO_CURVE;
    const rhPerDamp = -0.5 / mrF, halfRho = 0.5 * rho;
    const needBump = this.hasBumpStops, collectEst = !this.staticGiven, estMin = this.estMin, estMax = this.estMax;
    let estN = this.estN, refF = this.refFront, refR = this.refRear;
    // Static reference per corner: the readings when given, else the running estimate (kept in
    // plain locals, no closure: captured variables would live in a heap context inside the loop).
    let sfl = 0, sfr = 0, srl = 0, srr = 0;
    if (st) { sfl = st.fl; sfr = st.fr; srl = st.rl; srr = st.rr; }
    else if (estN > 0) { const s4 = this.static4; staticEstimate(est, estN, s4); sfl = s4[0]; sfr = s4[1]; srl = s4[2]; srr = s4[3]; }
    const offF = st ? st.fl + st.fr : 0, offR = st ? st.rl + st.rr : 0;
    const hist = this.contactHist;
    let waiting = 0;
    let sgN = sign.n, sgD = sign.sd, sgDD = sign.sdd, sgA = sign.sa, sgAA = sign.saa, sgAD = sign.sad, sgF = sign.sf, sgDF = sign.sdf, sgR = sign.sr, sgDR = sign.sdr;
    let sgQ = sign.sq, sgQQ = sign.sqq, sgDQ = sign.sdq, sgQF = sign.sqf, sgQR = sign.sqr;
    const sV = sl[V];
    if (this.tauBuf.length < count) { this.tauBuf = new Float64Array(count); this.bandBuf = new Int32Array(count); this.flagBuf = new Uint8Array(count); }
    const tauBuf = this.tauBuf, bandBuf = this.bandBuf, flagBuf = this.flagBuf;
    timeAndBandPass(count, cT, mV, this.opts.blockS, this.edgesMs, this.bandRows, this.bandSpeedSum, this, tauBuf, bandBuf, flagBuf);
    // The current block's aero sums live in locals (see AeroAccumulator.cur for the order).
    const cur = aero.cur, bs = aero.band, bc = aero.bandCur, blockMin = this.blockMin;
    let bn = cur[0], bt = cur[1], btt = cur[2], bq = cur[3], bqq = cur[4], bf = cur[5], bqf = cur[6], bff = cur[7], br = cur[8], bqr = cur[9], brr = cur[10];
    let bqa = cur[11], ba = cur[12], bh = cur[13], bhn = cur[14], bqqq = cur[15];
    for (let j = 0; j < count; j++) {
      const flag = flagBuf[j];
      if (flag === 0) { ffOut[j] = NaN; frOut[j] = NaN; continue; }
      if (flag !== ROW_VALID) {
        cur[0] = bn; cur[1] = bt; cur[2] = btt; cur[3] = bq; cur[4] = bqq; cur[5] = bf; cur[6] = bqf; cur[7] = bff; cur[8] = br; cur[9] = bqr; cur[10] = brr; cur[11] = bqa; cur[12] = ba; cur[13] = bh; cur[14] = bhn; cur[15] = bqqq;
        aero.closeBlock(blockMin);
        bn = bt = btt = bq = bqq = bf = bqf = bff = br = bqr = brr = bqa = ba = bh = bhn = bqqq = 0;
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
          addStaticSample(est, halfRho * v * v, xfl, xfr, xrl, xrr); estN++;
          const s4 = this.static4;
          staticEstimate(est, estN, s4); sfl = s4[0]; sfr = s4[1]; srl = s4[2]; srr = s4[3];
        }
        const staticKnown = st !== null || estN >= estMin;
        let cf = 0, cr = 0;
        if (staticKnown || !needBump) {
          if (needBump) {
            const cfl = xfl - sfl - gapF, cfr = xfr - sfr - gapF, crl = xrl - srl - gapR, crr = xrr - srr - gapR;
            // Stop forces at the damper, summed per axle; the wheel sees MR times that (virtual work).
            cf = (cfl > 0 ? bumpStopForceN(cfl, bxF, bfF) : 0) + (cfr > 0 ? bumpStopForceN(cfr, bxF, bfF) : 0);
            cr = (crl > 0 ? bumpStopForceN(crl, bxR, bfR) : 0) + (crr > 0 ? bumpStopForceN(crr, bxR, bfR) : 0);
          }
          const lt = ltPerMs2 * ax;
          ff = kF * (xfl + xfr - offF) + mrF * cf + lt;
          fr = kR * (xrl + xrr - offR) + mrR * cr - lt;
          if (st === null) {
            if (refF !== refF) { refF = ff; refR = fr; }
            ff -= refF; fr -= refR;
          }
        }
        if (needBump && staticKnown && v >= aeroMinV && Math.abs(ax) <= aeroMaxAx) {
          // Contact margin per axle: the more compressed wheel's travel from static, less the gap.
          const mf = xfl - sfl > xfr - sfr ? xfl - sfl : xfr - sfr, mr = xrl - srl > xrr - srr ? xrl - srl : xrr - srr;
          // Slot 0 below the histogram, C_BINS + 1 above it (NaN and −∞ margins land in slot 0).
          const bf = Math.floor((mf - gapF - C_LO) * C_PER_MM), br = Math.floor((mr - gapR - C_LO) * C_PER_MM);
          hist[bf >= 0 ? (bf < C_BINS ? bf + 1 : C_BINS + 1) : 0]++;
          hist[C_SLOTS + (br >= 0 ? (br < C_BINS ? br + 1 : C_BINS + 1) : 0)]++;
        }
        const dv = sV[j];
        if (v > 30 / KMH && Math.abs(dv) > 0.05 * G && ax === ax) {
          const d = dv * INV_G, axG = ax * INV_G, sf = xfl + xfr, sr = xrl + xrr;
          const w = v * v * 1e-3;
          sgN++; sgD += d; sgDD += d * d; sgA += axG; sgAA += axG * axG; sgAD += axG * d;
          sgF += sf; sgDF += d * sf; sgR += sr; sgDR += d * sr;
          sgQ += w; sgQQ += w * w; sgDQ += d * w; sgQF += w * sf; sgQR += w * sr;
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
            const q = halfRho * v * v;
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
            }
            if (staticKnown) {
              const hF = (xfl + xfr - sfl - sfr) * rhPerDamp;
              bh += hF; bhn++;
              aero.addRideHeight(hF, tau, q, ff, fr);
            }
          }
        }
      }

      ffOut[j] = ff; frOut[j] = fr;
    }
    cur[0] = bn; cur[1] = bt; cur[2] = btt; cur[3] = bq; cur[4] = bqq; cur[5] = bf; cur[6] = bqf; cur[7] = bff; cur[8] = br; cur[9] = bqr; cur[10] = brr; cur[11] = bqa; cur[12] = ba; cur[13] = bh; cur[14] = bhn; cur[15] = bqqq;
    this.estN = estN; this.refFront = refF; this.refRear = refR;
    sign.n = sgN; sign.sd = sgD; sign.sdd = sgDD; sign.sa = sgA; sign.saa = sgAA; sign.sad = sgAD;
    sign.sf = sgF; sign.sdf = sgDF; sign.sr = sgR; sign.sdr = sgDR;
    sign.sq = sgQ; sign.sqq = sgQQ; sign.sdq = sgDQ; sign.sqf = sgQF; sign.sqr = sgQR;
    this.aeroWaitingStatic += waiting;
    const part = this.part;
    if (part?.onSeed && !this.seedSent && (estN >= estMax || !collectEst) && (refF === refF || st !== null)) {
      this.seedSent = true;
      part.onSeed(this.seed);
    }
    // Understeer: quasi-steady cornering; straight-line samples give the steering offset.
    understeerPass(count, flagBuf, bandBuf, mV, mAY, mAX, mSTEER, mYAW, sSTEER, sAY, this.us, g, c.steeringRatio, c.wheelbaseM, this.blockMinUs, this);
    // Chart traces column by column, in SI; converted to display units at output.
    const tc = this.traceCols;
    const has = (name: string, col: Float64Array) => (this.mapped.has(name) ? col : null);
    tc[0] = cV; tc[1] = cAY; tc[2] = cAX; tc[3] = cSTEER; tc[4] = cFL; tc[5] = cFR; tc[6] = cRL; tc[7] = cRR;
    tc[8] = ffOut; tc[9] = frOut; tc[10] = has("ride_height_front", cRHF); tc[11] = has("ride_height_rear", cRHR); tc[12] = has("yaw_rate", cYAW);
    // A part pushes only the rows it owns (one run of rows: time increases).
    let from = 0, to = count;
    if (part) {
      while (from < count && flagBuf[from] === 0) from++;
      to = from;
      while (to < count && flagBuf[to] !== 0) to++;
      if (from < to && this.firstOwned < 0) {
        this.firstOwned = this.consumed + from;
        // The lead-in must fill the smoother's window, or the first owned rows would differ from a whole-log run.
        if (Number.isFinite(this.ownFrom) && this.firstOwned < sm.delay) throw new PartUnsafe("a part of the log starts with too short a lead-in for the smoothing window");
      }
    }
    this.consumed += count;
    if (from < to) this.traces.pushColumns(cT, tc, to, from);
  }
}

export function createSummaryBuilder(car: CarInput, options: SummaryOptions = {}, part: PartSpec | null = null): SummaryBuilder {
  return new SummaryBuilder(car, options, part);
}

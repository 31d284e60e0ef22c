/**
 * Streaming session summary: `createSummaryBuilder(car, options)`, then `push(block)` for each
 * ChannelBlock and `finish(ctx)` for the SessionSummary. Nothing of full resolution is kept: a short
 * delay line for the centred filters, sufficient statistics for the fits, decimated traces.
 *
 * The pipeline, in the order a newcomer should read it:
 *   1. row loop: summary.ts (smoothing, per call) → summary-rows.ts (time, bands; understeer samples)
 *      summary-loop.ts (axle forces, static estimate, aero sums) and sign-evidence.ts, all writing one
 *      plain state record (summary-state.ts);
 *   2. channel checks: summary-checks.ts (signs and units, sign-evidence.ts and unit-check.ts);
 *   3. aero fit: summary-aero.ts (fit, model choice, headline ClA and balance);
 *   4. bands: summary-bands.ts (loads, balance, ride height per band, balance shift);
 *   5. understeer: summary-understeer.ts (steering offset, gradient per band);
 *   6. output: summary-finish.ts (the SessionSummary).
 */
import { BlockSmoother } from "./filters";
import { PartUnsafe } from "./errors";
import { addSignRows, evenWindowFlags } from "./sign-evidence";
import { copyBlock, estimateDt } from "./summary-blocks";
import { aeroPass, AX, AY, DFL, DFR, DRL, DRR, RHF, RHR, SLOT_CHANNELS, STEER, T, V, YAW } from "./summary-loop";
import type { RowScratch } from "./summary-loop";
import { buildSummary } from "./summary-finish";
import type { SummaryOptions } from "./summary-options";
import { timeAndBandPass, understeerPass } from "./summary-rows";
import { absorbParts, createSummaryState, partOf, seedOf, startState, takeSeed } from "./summary-state";
import type { StaticSeed, SummaryPart, SummaryState } from "./summary-state";
import { TRACE_CHANNELS } from "./summary-traces";
import type { FinishContext, SessionSummary } from "./summary-types";
import type { CarInput, ChannelBlock } from "./types";

export type { SessionSummary, FinishContext } from "./summary-types";
export type { SummaryOptions } from "./summary-options";
export type { StaticReference, StaticSeed, SummaryPart, SummaryState } from "./summary-state";
export { TRACE_CHANNELS } from "./summary-traces";

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

export class SummaryBuilder {
  /** The state the row loop writes and the finishing stages read. */
  readonly state: SummaryState;
  private readonly part: PartSpec | null;
  private seedSent = false;
  /** Delayed rows consumed so far, and the stream index of the first owned one (−1 until seen). */
  private consumed = 0;
  private firstOwned = -1;
  private sm: BlockSmoother | null = null;
  private pending: ChannelBlock[] = [];
  /** Rows that count for the sign evidence (evenWindowFlags). */
  private signFlag = new Uint8Array(0);
  private scratch: RowScratch = { tau: new Float64Array(0), band: new Int32Array(0), flag: new Uint8Array(0), ff: new Float64Array(0), fr: new Float64Array(0) };
  private blockMin = 2;
  private blockMinUs = 2;
  private readonly traceCols: (Float64Array | null)[] = new Array(TRACE_CHANNELS.length).fill(null);
  private readonly cols: (Float64Array | null)[] = new Array(SLOT_CHANNELS.length).fill(null);

  constructor(car: CarInput, options: SummaryOptions = {}, part: PartSpec | null = null) {
    this.state = createSummaryState(car, options);
    this.part = part;
    if (part) {
      const s = this.state;
      s.t0 = part.t0;
      s.ownFrom = part.fromBlock;
      s.ownTo = part.toBlock;
      s.owned = false;
      if (part.seed) takeSeed(s, part.seed);
      this.start(part.dtS);
    }
  }

  /** A part's builder has consumed every row it owns (later rows are run-out only). */
  get partDone(): boolean {
    return this.state.passedEnd;
  }

  push(block: ChannelBlock): void {
    if (block.rows === 0) return;
    for (const k of Object.keys(block.channels)) this.state.mapped.add(k);
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
    this.flush();
    return buildSummary(this.state, ctx);
  }

  /** End of a part: its contribution as plain data (see mergeParts in split.ts). */
  finishPart(): SummaryPart {
    this.flush();
    return partOf(this.state);
  }

  /** Folds in the parts of one log, in time order, on a builder that was given no blocks; then `summarise`. */
  absorb(parts: readonly SummaryPart[]): void {
    absorbParts(this.state, parts);
  }

  /** The summary of a builder that absorbed parts. */
  summarise(ctx: FinishContext = {}): SessionSummary {
    return buildSummary(this.state, ctx);
  }

  private flush(): void {
    if (this.sm) this.consume(this.sm.flush());
    this.state.aero.closeBlock(this.blockMin);
    this.state.us.closeBlock(this.blockMinUs);
  }

  private start(dt: number): void {
    const s = this.state;
    startState(s, dt);
    const h1 = Math.max(1, Math.round(s.opts.damperSmoothingS / dt / 2));
    const h2 = Math.max(1, Math.round(s.opts.gateSmoothingS / dt / 2));
    const halves = SLOT_CHANNELS.map((_, i) => ((i >= DFL && i <= RHR) || i === V || i === AX || i === T ? h1 : h2));
    // Window sums restart at every time block (filters.ts): a part of the log then smooths exactly as the whole-log run.
    this.sm = new BlockSmoother(halves, dt, SLOT_CHANNELS.map((_, i) => i === V || i === AY || i === STEER || (i >= DFL && i <= DRR)), 16_384, { channel: T, periodS: s.opts.blockS, t0: s.t0 });
    const perBlock = s.opts.blockS / dt;
    this.blockMin = Math.max(2, Math.round(0.25 * perBlock));
    this.blockMinUs = Math.max(2, Math.round(0.1 * perBlock));
  }

  private run(block: ChannelBlock): void {
    for (let k = 0; k < SLOT_CHANNELS.length; k++) this.cols[k] = block.channels[SLOT_CHANNELS[k]] ?? null;
    this.consume(this.sm!.push(this.cols, block.rows));
  }

  /** Stage 1, the row loop: `count` delayed rows are ready in the smoother's output arrays. */
  private consume(count: number): void {
    const s = this.state, sm = this.sm!;
    const m = sm.mean, sl = sm.slope, ce = sm.centre;
    let x = this.scratch;
    if (x.tau.length < count) x = this.scratch = { tau: new Float64Array(count), band: new Int32Array(count), flag: new Uint8Array(count), ff: new Float64Array(count), fr: new Float64Array(count) };
    timeAndBandPass(count, ce[T], m[V], s.opts.blockS, s.edgesMs, s.bandRows, s.bandSpeedSum, s, x.tau, x.band, x.flag);
    aeroPass(s, sm, count, x, this.blockMin);
    if (this.signFlag.length < count) this.signFlag = new Uint8Array(x.flag.length);
    evenWindowFlags(count, x.flag, m[T], ce[T], 1 / s.sampleRateHz, this.signFlag);
    addSignRows(s.sign, count, this.signFlag, m[V], sl[V], m[AX], m[AY], m[STEER], m[YAW], m[DFL], m[DFR], m[DRL], m[DRR]);
    const part = this.part;
    if (part?.onSeed && !this.seedSent && (s.estN >= s.estMax || s.staticGiven) && (s.refFront === s.refFront || s.staticGiven)) {
      this.seedSent = true;
      part.onSeed(seedOf(s));
    }
    // Understeer: quasi-steady cornering; straight-line samples give the steering offset.
    understeerPass(count, x.flag, x.band, m[V], m[AY], m[AX], m[STEER], m[YAW], sl[STEER], sl[AY], s.us, s.opts.gates, s.model.steeringRatio, s.model.wheelbaseM, this.blockMinUs);
    this.pushTraces(count);
  }

  /** Chart traces column by column, in SI (converted to display units at output); a part pushes only the rows it owns. */
  private pushTraces(count: number): void {
    const s = this.state, sm = this.sm!, ce = sm.centre, x = this.scratch, flag = x.flag;
    const tc = this.traceCols;
    const has = (name: string, col: Float64Array) => (s.mapped.has(name) ? col : null);
    tc[0] = ce[V]; tc[1] = ce[AY]; tc[2] = ce[AX]; tc[3] = ce[STEER]; tc[4] = ce[DFL]; tc[5] = ce[DFR]; tc[6] = ce[DRL]; tc[7] = ce[DRR];
    tc[8] = x.ff; tc[9] = x.fr; tc[10] = has("ride_height_front", ce[RHF]); tc[11] = has("ride_height_rear", ce[RHR]); tc[12] = has("yaw_rate", ce[YAW]);
    // A part pushes only the rows it owns (one run of rows: time increases).
    let from = 0, to = count;
    if (this.part) {
      while (from < count && flag[from] === 0) from++;
      to = from;
      while (to < count && flag[to] !== 0) to++;
      if (from < to && this.firstOwned < 0) {
        this.firstOwned = this.consumed + from;
        // The lead-in must hold a restart of the smoother's sums (filters.ts), or the first owned rows would differ from a whole-log run.
        if (Number.isFinite(s.ownFrom) && (sm.exactFrom < 0 || this.firstOwned < sm.exactFrom)) throw new PartUnsafe("a part of the log starts with too short a lead-in for the smoothing window");
      }
    }
    this.consumed += count;
    if (from < to) s.traces.pushColumns(ce[T], tc, to, from);
  }
}

export function createSummaryBuilder(car: CarInput, options: SummaryOptions = {}, part: PartSpec | null = null): SummaryBuilder {
  return new SummaryBuilder(car, options, part);
}

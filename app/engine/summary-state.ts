/**
 * The streaming summary's state: one plain record of typed arrays, accumulators and counters,
 * written by the row loop (summary-loop.ts, summary-rows.ts) and read by the finishing stages
 * (summary-finish.ts). Nothing here computes a figure; the stages do.
 */
import { AeroAccumulator } from "./aero";
import type { BlockMoments } from "./aero-model";
import { bandEdgesMs } from "./bands";
import { carModel, validateCar } from "./car";
import type { CarModel } from "./car";
import { sessionAirDensity } from "./density";
import { resolveOptions } from "./summary-options";
import type { ResolvedOptions, SummaryOptions } from "./summary-options";
import { TRACE_CHANNELS, TraceDecimator } from "./summary-traces";
import type { TraceState } from "./summary-traces";
import { CONTACT_SLOTS, STATIC_SUMS, staticEstimate } from "./static-estimate";
import { createSignSums } from "./sign-evidence";
import type { SignSums } from "./sign-evidence";
import type { CarInput } from "./types";
import { UndersteerAccumulator } from "./understeer";

export interface SummaryState {
  readonly car: CarInput;
  readonly model: CarModel;
  readonly opts: ResolvedOptions;
  readonly air: ReturnType<typeof sessionAirDensity>;
  /** Band edges in m/s; bandCount bands. */
  readonly edgesMs: Float64Array;
  readonly bandCount: number;
  readonly aero: AeroAccumulator;
  readonly us: UndersteerAccumulator;
  readonly traces: TraceDecimator;
  /** Rows per band, and Σ speed (m/s) of each band's rows. */
  readonly bandRows: Float64Array;
  readonly bandSpeedSum: Float64Array;
  readonly staticGiven: boolean;
  readonly hasBumpStops: boolean;
  /** Channels present in the blocks (optional ones may be absent). */
  readonly mapped: Set<string>;
  sampleRateHz: number;
  rows: number;
  t0: number;
  tLast: number;
  /** Aero samples skipped while no static estimate existed for the bump-stop model. */
  aeroWaitingStatic: number;
  /** Bump-stop contact margins of running samples, front then rear (see static-estimate.ts). */
  readonly contactHist: Float64Array;
  /** Static damper estimate from slow running without load transfer (only when readings are not given). */
  readonly est: Float64Array;
  estN: number;
  estMin: number;
  estMax: number;
  /** The first axle forces, the reference the forces are taken from when no static readings are given. */
  refFront: number;
  refRear: number;
  /** Sign evidence against dv/dt and between the lateral channels (sign-evidence.ts). */
  readonly sign: SignSums;
  /** Time blocks (summary-rows.ts TimeState): the current block, and the blocks this run owns. */
  blockStart: number;
  blockEnd: number;
  ownFrom: number;
  ownTo: number;
  owned: boolean;
  passedEnd: boolean;
}

export function createSummaryState(car: CarInput, options: SummaryOptions = {}): SummaryState {
  const valid = validateCar(car);
  const model = carModel(valid);
  const opts = resolveOptions(options);
  const bandCount = opts.bandEdgesKmh.length - 1;
  return {
    car: valid,
    model,
    opts,
    air: sessionAirDensity(opts.airTempC, opts.airPressureHpa, opts.airHumidityPct),
    edgesMs: bandEdgesMs(opts.bandEdgesKmh),
    bandCount,
    aero: new AeroAccumulator(bandCount),
    us: new UndersteerAccumulator(bandCount),
    traces: new TraceDecimator(TRACE_CHANNELS, opts.traceBuckets),
    bandRows: new Float64Array(bandCount),
    bandSpeedSum: new Float64Array(bandCount),
    staticGiven: model.staticDamperMm !== null,
    hasBumpStops: model.bumpForcePerMmFront > 0 || model.bumpForcePerMmRear > 0,
    mapped: new Set<string>(),
    sampleRateHz: NaN,
    rows: 0,
    t0: NaN,
    tLast: NaN,
    aeroWaitingStatic: 0,
    contactHist: new Float64Array(2 * CONTACT_SLOTS),
    est: new Float64Array(STATIC_SUMS),
    estN: 0,
    estMin: 0,
    estMax: 0,
    refFront: NaN,
    refRear: NaN,
    sign: createSignSums(),
    blockStart: 0,
    blockEnd: -1,
    ownFrom: -Infinity,
    ownTo: Infinity,
    owned: true,
    passedEnd: false,
  };
}

/** Settles what depends on the sample interval once it is known. */
export function startState(s: SummaryState, dtS: number): void {
  s.sampleRateHz = 1 / dtS;
  s.estMin = Math.max(5, Math.round(0.5 / dtS));
  s.estMax = Math.round(5 / dtS);
}

/**
 * The static damper reference while it is being learned from slow running (only when the car file
 * gives no static readings): the sums of static-estimate.ts, their count, and the first axle forces.
 * Order matters here, so a part of a log takes it over from the part before.
 */
export interface StaticSeed {
  est: number[];
  estN: number;
  refFront: number;
  refRear: number;
}

export function seedOf(s: SummaryState): StaticSeed {
  return { est: Array.from(s.est), estN: s.estN, refFront: s.refFront, refRear: s.refRear };
}

export function takeSeed(s: SummaryState, seed: StaticSeed): void {
  s.est.set(seed.est);
  s.estN = seed.estN; s.refFront = seed.refFront; s.refRear = seed.refRear;
}

export interface StaticReference { source: "car_file" | "estimated"; fl: number; fr: number; rl: number; rr: number; samples: number }

/**
 * The static damper readings (mm, as mapped): the car file's, else the slow-running estimate once it
 * has enough samples, less the damper travel that running's aero load accounts for (per axle).
 */
export function staticReference(s: SummaryState, aeroTravelMm: { front: number; rear: number } = { front: 0, rear: 0 }): StaticReference | null {
  const st = s.model.staticDamperMm;
  if (st) return { source: "car_file", fl: st.fl, fr: st.fr, rl: st.rl, rr: st.rr, samples: 0 };
  if (s.estN < s.estMin) return null;
  const s4 = new Float64Array(4);
  staticEstimate(s.est, s.estN, s4);
  const f = aeroTravelMm.front, r = aeroTravelMm.rear;
  return { source: "estimated", fl: s4[0] - f, fr: s4[1] - f, rl: s4[2] - r, rr: s4[3] - r, samples: s.estN };
}

/** Everything a part of a log contributes to the session summary: plain data that crosses threads. */
export interface SummaryPart {
  rows: number; t0: number; tLast: number; sampleRateHz: number;
  mapped: string[];
  aeroSamples: number[]; aeroBlocks: number[]; aeroMoments: ReturnType<BlockMoments["state"]>; rhMap: Float64Array; aeroBand: Float64Array; aeroBandBlocks: Float64Array;
  usCells: Float64Array; usSegments: Float64Array; usPeakAyG: Float64Array; usLeft: Float64Array; usRight: Float64Array;
  usScalars: number[];
  sign: Float64Array;
  contactHist: Float64Array; aeroWaitingStatic: number;
  bandRows: Float64Array; bandSpeedSum: Float64Array;
  seed: StaticSeed;
  traces: TraceState;
}

const SUM_KEYS = ["n", "st", "sq", "stt", "stq", "sqq", "sf", "stf", "sqf", "sff", "sr", "str", "sqr", "srr"] as const;
const US_SCALARS = ["offsetN", "offsetSum", "offsetSumSq", "offsetBlocks", "offsetBlockSum", "offsetBlockSumSq"] as const;

/** A part's contribution (see mergeParts in split.ts); the row loop must have been flushed. */
export function partOf(s: SummaryState): SummaryPart {
  const a = s.aero, u = s.us;
  return {
    rows: s.rows, t0: s.t0, tLast: s.tLast, sampleRateHz: s.sampleRateHz,
    mapped: [...s.mapped],
    aeroSamples: SUM_KEYS.map((k) => a.samples[k]), aeroBlocks: SUM_KEYS.map((k) => a.blocks[k]), aeroMoments: a.moments.state(),
    rhMap: a.rhMap.slice(), aeroBand: a.band.slice(), aeroBandBlocks: a.bandBlocks.slice(),
    usCells: u.cells.slice(), usSegments: u.segments(), usPeakAyG: u.peakAyG.slice(), usLeft: u.left.slice(), usRight: u.right.slice(),
    usScalars: US_SCALARS.map((k) => u[k]),
    sign: s.sign.slice(),
    contactHist: s.contactHist.slice(), aeroWaitingStatic: s.aeroWaitingStatic,
    bandRows: s.bandRows.slice(), bandSpeedSum: s.bandSpeedSum.slice(),
    seed: seedOf(s),
    traces: s.traces.state(),
  };
}

/**
 * Folds in the parts of one log, in time order, on a state that was given no rows. Sums add; the
 * static reference is the last part's.
 */
export function absorbParts(s: SummaryState, parts: readonly SummaryPart[]): void {
  const add = (into: Float64Array, from: Float64Array) => { for (let i = 0; i < into.length; i++) into[i] += from[i]; };
  const a = s.aero, u = s.us;
  parts.forEach((p, i) => {
    if (i === 0) { s.t0 = p.t0; s.sampleRateHz = p.sampleRateHz; }
    if (p.rows > 0) s.tLast = p.tLast;
    s.rows += p.rows;
    for (const m of p.mapped) s.mapped.add(m);
    SUM_KEYS.forEach((k, j) => { a.samples[k] += p.aeroSamples[j]; a.blocks[k] += p.aeroBlocks[j]; });
    a.moments.absorb(p.aeroMoments);
    add(a.rhMap, p.rhMap); add(a.band, p.aeroBand); add(a.bandBlocks, p.aeroBandBlocks);
    add(u.cells, p.usCells); u.appendSegments(p.usSegments); add(u.left, p.usLeft); add(u.right, p.usRight);
    for (let b = 0; b < u.peakAyG.length; b++) u.peakAyG[b] = Math.max(u.peakAyG[b], p.usPeakAyG[b]);
    US_SCALARS.forEach((k, j) => { u[k] += p.usScalars[j]; });
    add(s.sign, p.sign);
    add(s.contactHist, p.contactHist); s.aeroWaitingStatic += p.aeroWaitingStatic;
    add(s.bandRows, p.bandRows); add(s.bandSpeedSum, p.bandSpeedSum);
    takeSeed(s, p.seed);
    if (i === 0) s.traces.restore(p.traces); else s.traces.append(p.traces);
  });
}

/**
 * Analysis of one log in parts, one per thread: a 500 MB export on a machine with N cores takes
 * about 1/N of the time. Still plain engine code (no threads here): the host supplies random access
 * to the file (`readAt`, `open`) and, optionally, a runner that puts each part on a worker.
 *
 * How the parts fit together so the summary equals the whole-log run's:
 * - Each part owns a byte range (for the row and dropout counts) and a run of 1 s time blocks (for
 *   every statistic). Time-block edges as owner boundaries keep each interval block whole.
 * - A part reads a lead-in before its first owned row and a run-out after its last, so the
 *   centred smoothing windows at its edges see the same samples as in a whole-log run.
 * - Sums add across parts. Only the static damper reference learned from slow running (when the
 *   car file gives no static readings) depends on order: a part then starts once the part before
 *   has settled it, and takes it over.
 * Anything a part cannot do on its own (quoted cells, an input error that needs a file line
 * number) makes the whole log run instead, which gives the same summary or the exact error.
 */
import { analyseLog } from "./analyse";
import type { AnalyseOptions } from "./analyse";
import { validateCar } from "./car";
import { PartUnsafe } from "./errors";
import { ingestPart, requireEnoughRows } from "./ingest";
import type { PartIngest } from "./ingest";
import { scanHeader } from "./inspect";
import { validateChannelMap } from "./mapping";
import { createSummaryBuilder } from "./summary";
import type { SessionSummary, StaticSeed, SummaryPart } from "./summary";
import { estimateDt } from "./summary-blocks";
import { resolveOptions } from "./summary-options";
import type { SummaryOptions } from "./summary-options";
import type { CarInput, ChannelBlock, ChannelMap, LogHeader } from "./types";

/** Parts are at least this big: below it the lead-in, run-out and thread start are not worth it. */
export const MIN_PART_BYTES = 16 << 20;
/** Bytes read before a part's first owned row (≈ 10 000 rows of 100 bytes; the smoothing needs a few hundred). */
const LEAD_IN_BYTES = 1 << 20;
/** Bytes read at the start and at each boundary to find the header, the sample rate and the boundary's time. */
const PROBE_BYTES = 1 << 20;

export type ByteSource = AsyncIterable<Uint8Array> | ReadableStream<Uint8Array>;

/** Random access to the log file (a File's slice in the browser, a file handle in Node). */
export interface LogFileAccess {
  size: number;
  /** Up to `length` bytes from `offset`. */
  readAt(offset: number, length: number): Promise<Uint8Array>;
  /** A stream of the file from `offset` to its end. */
  open(offset: number): ByteSource;
}

export interface PartPlan {
  index: number;
  /** File offset where the part starts reading; past the first part, the read skips to the next line. */
  readFrom: number;
  skipToLine: boolean;
  /** Owned bytes [ownedFrom, ownedTo) (∞ for the last part). */
  ownedFrom: number;
  ownedTo: number;
  /** Owned time blocks [fromBlock, toBlock) (−∞ / ∞ at the ends). */
  fromBlock: number;
  toBlock: number;
}

/** Structured-clone friendly: it is posted to each worker. */
export interface LogPlan {
  header: LogHeader;
  size: number;
  t0: number;
  dtS: number;
  parts: PartPlan[];
}

export interface PartResult {
  ingest: PartIngest;
  summary: SummaryPart;
}

function single(bytes: Uint8Array): AsyncIterable<Uint8Array> {
  return (async function* () {
    yield bytes;
  })();
}

/** Rows of `bytes` (which start at a row) up to their last line break, as blocks; null on an input problem. */
async function probeBlocks(bytes: Uint8Array, map: ChannelMap, header: LogHeader, offset: number): Promise<ChannelBlock[] | null> {
  const lastLf = bytes.lastIndexOf(10);
  if (lastLf < 0) return null;
  const blocks: ChannelBlock[] = [];
  try {
    await ingestPart(single(bytes.subarray(0, lastLf + 1)), map, header, {
      startOffset: offset,
      skipToLine: false,
      ownedFrom: offset,
      ownedTo: Infinity,
      onBlock: (b) => blocks.push({ rows: b.rows, channels: { time: b.channels.time!.slice(0, b.rows) } }),
    });
  } catch (e) {
    if (e instanceof PartUnsafe) throw e;
    return null;
  }
  return blocks;
}

const firstTime = (blocks: ChannelBlock[]) => (blocks.length ? blocks[0].channels.time![0] : NaN);

/**
 * Where to cut the log into `parts` (fewer when it is small). Null when the log should be analysed
 * whole: too small, or an input problem near the start or a boundary (the whole-log run then
 * reports it exactly); throws PartUnsafe for quoted cells there.
 */
export interface PlanLimits {
  /** Smallest part (bytes); default MIN_PART_BYTES. */
  minPartBytes?: number;
  /** Lead-in read before each boundary (bytes); default 1 MB. */
  leadInBytes?: number;
}

export async function planParts(file: LogFileAccess, map: ChannelMap, options: SummaryOptions, parts: number, limits: PlanLimits = {}): Promise<LogPlan | null> {
  const minPart = limits.minPartBytes ?? MIN_PART_BYTES, leadIn = limits.leadInBytes ?? LEAD_IN_BYTES;
  const head = await file.readAt(0, Math.min(file.size, PROBE_BYTES));
  let scan;
  try {
    scan = scanHeader(head, head.length >= file.size);
    validateChannelMap(map, scan.header);
  } catch {
    return null;
  }
  const { header, dataOffset } = scan;
  const n = Math.min(Math.floor(parts), Math.floor((file.size - dataOffset) / minPart));
  if (!(n >= 2)) return null;
  const blockS = resolveOptions(options).blockS;
  // The sample interval as the whole-log run estimates it (the median of the first 512 steps).
  const start = await probeBlocks(head.subarray(dataOffset), map, header, dataOffset);
  if (!start || start.reduce((s, b) => s + b.rows, 0) < 600) return null;
  const t0 = firstTime(start);
  const dtS = estimateDt(start);
  if (dtS === null || !(t0 === t0)) return null;

  const cuts: { at: number; block: number }[] = [];
  for (let k = 1; k < n; k++) {
    const nominal = Math.floor(dataOffset + ((file.size - dataOffset) * k) / n);
    const window = await file.readAt(nominal, PROBE_BYTES);
    const lf = window.indexOf(10);
    if (lf < 0) return null;
    const at = nominal + lf + 1;
    const blocks = await probeBlocks(window.subarray(lf + 1), map, header, at);
    const t = blocks ? firstTime(blocks) : NaN;
    if (!(t === t)) return null;
    // The boundary is the first time-block edge after the first row at `at`.
    const block = Math.floor((t - t0) / blockS) + 1;
    if (cuts.length && block <= cuts[cuts.length - 1].block) return null;
    if (at - leadIn <= dataOffset) return null;
    cuts.push({ at, block });
  }
  const plans: PartPlan[] = [];
  for (let k = 0; k < n; k++) {
    const from = k === 0 ? null : cuts[k - 1];
    const to = k === n - 1 ? null : cuts[k];
    plans.push({
      index: k,
      readFrom: from ? from.at - leadIn : dataOffset,
      skipToLine: from !== null,
      ownedFrom: from ? from.at : dataOffset,
      ownedTo: to ? to.at : Infinity,
      fromBlock: from ? from.block : -Infinity,
      toBlock: to ? to.block : Infinity,
    });
  }
  return { header, size: file.size, t0, dtS, parts: plans };
}

export interface PartRunOptions {
  /** The static reference taken over from the part before (only when the car file gives no static readings). */
  seed: StaticSeed | null;
  onSeed?(seed: StaticSeed): void;
  /** The part's owned bytes read so far. */
  onProgress?(bytes: number): void;
}

/** One part, start to end: this is what a worker runs. */
export async function analysePart(source: ByteSource, car: CarInput, map: ChannelMap, options: SummaryOptions, plan: LogPlan, index: number, run: PartRunOptions): Promise<PartResult> {
  const p = plan.parts[index];
  const builder = createSummaryBuilder(car, options, { t0: plan.t0, dtS: plan.dtS, fromBlock: p.fromBlock, toBlock: p.toBlock, seed: run.seed, onSeed: run.onSeed });
  const ingest = await ingestPart(source, map, plan.header, {
    startOffset: p.readFrom,
    skipToLine: p.skipToLine,
    ownedFrom: p.ownedFrom,
    ownedTo: p.ownedTo,
    onBlock: (b) => builder.push(b),
    shouldStop: () => builder.partDone,
    onProgress: run.onProgress,
  });
  return { ingest, summary: builder.finishPart() };
}

/** Runs part `index` of the plan (on a worker, say) and resolves with its result; `onSeed` may be called before. */
export type PartRunner = (plan: LogPlan, index: number, run: PartRunOptions) => Promise<PartResult>;

/** The parts' results, in order, as one session summary. */
export function mergeParts(car: CarInput, map: ChannelMap, options: SummaryOptions, plan: LogPlan, results: readonly PartResult[]): SessionSummary {
  const rows = results.reduce((s, r) => s + r.ingest.rows, 0);
  requireEnoughRows(rows);
  const droppedCells: Record<string, number> = {};
  for (const r of results) for (const [column, n] of Object.entries(r.ingest.droppedCells)) droppedCells[column] = (droppedCells[column] ?? 0) + n;
  const badCells: Record<string, number> = {};
  for (const r of results) for (const [column, n] of Object.entries(r.ingest.badCells)) badCells[column] = (badCells[column] ?? 0) + n;
  const builder = createSummaryBuilder(car, options);
  builder.absorb(results.map((r) => r.summary));
  const shortRows = { count: 0, times: [] as number[] };
  for (const r of results) { shortRows.count += r.ingest.shortRows.count; shortRows.times.push(...r.ingest.shortRows.times); }
  return builder.summarise({ header: plan.header, map, rows, bytes: plan.size, droppedCells, badCells, shortRows });
}

/**
 * Runs every part through `runner`: all at once when the car file gives static damper readings,
 * else each as soon as the part before has settled the static reference.
 */
export async function runParts(car: CarInput, plan: LogPlan, runner: PartRunner, onProgress?: (bytes: number) => void): Promise<PartResult[]> {
  const staticGiven = validateCar(car).static_damper_mm !== undefined;
  const n = plan.parts.length;
  // Progress over the file: the header's bytes plus every part's owned bytes read so far.
  const done = new Float64Array(n);
  const head = plan.parts[0].ownedFrom;
  const progress = (k: number) => (bytes: number) => {
    done[k] = bytes;
    onProgress?.(head + done.reduce((a, b) => a + b, 0));
  };
  // Every result is awaited (an early failure must not leave a later rejection unhandled).
  const all = (ps: Promise<PartResult>[]) => {
    for (const p of ps) p.catch(() => {});
    return Promise.all(ps);
  };
  if (staticGiven) return all(plan.parts.map((_, k) => runner(plan, k, { seed: null, onProgress: progress(k) })));
  const results: Promise<PartResult>[] = [];
  let seedFor: Promise<StaticSeed | null> = Promise.resolve(null);
  for (let k = 0; k < n; k++) {
    const seed = await seedFor;
    let settle!: (s: StaticSeed) => void;
    const settled = new Promise<StaticSeed>((resolve) => (settle = resolve));
    const result = runner(plan, k, { seed, onSeed: (s) => settle(s), onProgress: progress(k) });
    result.catch(() => {});
    results.push(result);
    // The next part waits for this one's settled reference, or for its end state.
    seedFor = Promise.race([settled, result.then((r) => r.summary.seed)]);
    seedFor.catch(() => {}); // awaited only if there is a next part; the failure itself surfaces below
    if (k < n - 1) await Promise.race([settled, result]);
  }
  return all(results);
}

export interface SplitOptions extends AnalyseOptions, PlanLimits {
  /** Parts to cut the log into (threads to use); 1 analyses it whole. */
  parts: number;
  /** Puts a part on a worker; by default the parts run one after the other in this thread. */
  runner?: PartRunner;
}

/** How a split analysis went, for the caller's log line or the bench. */
export interface SplitReport {
  parts: number;
  /** Why the log was analysed whole (null when it was split). */
  whole: string | null;
}

/**
 * analyseLog, cut into parts. Gives the whole-log summary (within rounding of the last digit) or,
 * on any input problem, exactly the whole-log run's error.
 */
export async function analyseLogSplit(file: LogFileAccess, car: CarInput, map: ChannelMap, options: SplitOptions, report?: (r: SplitReport) => void): Promise<SessionSummary> {
  const { parts, runner, onProgress, minPartBytes, leadInBytes, ...summaryOptions } = options;
  // Bad car or options are reported before any file is read or any part started.
  validateCar(car);
  resolveOptions(summaryOptions);
  const whole = (why: string) => {
    report?.({ parts: 1, whole: why });
    return analyseLog(file.open(0), car, map, { ...summaryOptions, onProgress });
  };
  if (!(parts >= 2)) return whole("one part asked for");
  let plan: LogPlan | null;
  try {
    plan = await planParts(file, map, summaryOptions, parts, { minPartBytes, leadInBytes });
  } catch (e) {
    if (e instanceof PartUnsafe) return whole(e.message);
    throw e;
  }
  if (!plan) return whole("the log is too small to split, or its start or a boundary needs the whole-log reader");
  const run: PartRunner = runner ?? ((pl, k, r) => analysePart(file.open(pl.parts[k].readFrom), car, map, summaryOptions, pl, k, r));
  let results: PartResult[];
  try {
    results = await runParts(car, plan, run, onProgress);
  } catch (e) {
    return whole(e instanceof PartUnsafe ? e.message : `a part stopped (${e instanceof Error ? e.message : String(e)}); the whole-log run reports it exactly`);
  }
  onProgress?.(file.size);
  report?.({ parts: plan.parts.length, whole: null });
  return mergeParts(car, map, summaryOptions, plan, results);
}

/**
 * What the browser's engine worker offers the page, as a flat async API over app/engine.
 * Kept apart from the worker entry so it can be tested without a Worker global, and so nothing here
 * reaches JSX (the dev server's hot-reload preamble breaks a worker that imports it).
 */
import { expose, proxy, releaseProxy, transfer, wrap } from "comlink";
import { analyseLog } from "../app/engine/analyse";
import type { AnalyseOptions } from "../app/engine/analyse";
import { EngineError, isEngineError, type EngineErrorCode } from "../app/engine/errors";
import { inspectLog, suggestChannelMap, validateChannelMap } from "../app/engine/ingest";
import { checkChannelSigns } from "../app/engine/sign-check";
import type { SignCheck } from "../app/engine/sign-check";
import { analyseLogSplit, analysePart, mergeParts, planParts } from "../app/engine/split";
import type { LogFileAccess, LogPlan, PartResult, PartRunner, PlanLimits } from "../app/engine/split";
import type { SessionSummary, StaticSeed } from "../app/engine/summary";
import type { SummaryOptions } from "../app/engine/summary-options";
import type { CarInput, ChannelMap, LogHeader } from "../app/engine/types";
import { previewColumns, type ColumnPreview } from "./column-preview";
import { checkUnitsOnHead } from "./unit-checks";

/** Bytes read from the start of a file to show its header and propose a Channel map. */
export const HEAD_SLICE_BYTES = 1 << 18;

/** Bytes read from the start of a file for the sign and unit checks and the previews (some minutes of running at 100 Hz). */
export const SIGN_CHECK_BYTES = 4 << 20;

/** How often the analysis reports progress (ms): often enough for a smooth bar, rare enough to cost nothing. */
const PROGRESS_EVERY_MS = 100;

/** Where a whole-file read stands. `rows` counts line ends read so far (header lines included). */
export interface ReadProgress {
  bytes: number;
  totalBytes: number;
  rows: number;
  elapsedMs: number;
}

export interface Inspection {
  header: LogHeader;
  suggestion: ReturnType<typeof suggestChannelMap>;
  /** The numeric columns over the first minutes, as logged; null when no column orders the rows. */
  preview: ColumnPreview | null;
}

export type EngineResult<T> = { ok: true; value: T } | { ok: false; code: string; message: string };

async function guarded<T>(run: () => T | Promise<T>): Promise<EngineResult<T>> {
  try {
    return { ok: true, value: await run() };
  } catch (e) {
    // Input problems travel back as data (structured clone drops custom error classes);
    // anything else is a bug and is rethrown to the page's error handling.
    if (isEngineError(e)) return { ok: false, code: e.code, message: e.message };
    throw e;
  }
}

/** A File (or any Blob) as random access for the split analysis. */
function blobAccess(file: Blob): LogFileAccess {
  return {
    size: file.size,
    readAt: async (offset, length) => new Uint8Array(await file.slice(offset, offset + length).arrayBuffer()),
    open: (offset) => file.slice(offset).stream(),
  };
}

/** Passes a byte stream through, counting its line ends (memchr-fast indexOf; no copy). */
async function* countingLines(stream: ReadableStream<Uint8Array>, add: (n: number) => void): AsyncGenerator<Uint8Array> {
  const reader = stream.getReader();
  let finished = false;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) {
        finished = true;
        return;
      }
      let n = 0;
      for (let i = value.indexOf(10); i >= 0; i = value.indexOf(10, i + 1)) n++;
      add(n);
      yield value;
    }
  } finally {
    if (!finished) await reader.cancel().catch(() => {});
    reader.releaseLock();
  }
}

export const engineApi = {
  /**
   * Header, units row, preamble metadata, a proposed Channel map and every numeric column's preview
   * over the first minutes (its buffers are transferred, not copied).
   */
  async inspect(file: Blob): Promise<EngineResult<Inspection>> {
    const head = new Uint8Array(await file.slice(0, SIGN_CHECK_BYTES).arrayBuffer());
    const whole = file.size <= SIGN_CHECK_BYTES;
    const result = await guarded(() => {
      const header = inspectLog(head.subarray(0, HEAD_SLICE_BYTES));
      const suggestion = suggestChannelMap(header);
      return { header, suggestion, preview: previewColumns(head, whole, suggestion.map.time?.column ?? null) };
    });
    const buffers = result.ok && result.value.preview
      ? Object.values(result.value.preview.columns).flatMap((c) => [c.min.buffer as ArrayBuffer, c.max.buffer as ArrayBuffer])
      : [];
    return transfer(result, buffers);
  },

  /** Proposes `invert` flips for the map as it stands, from the first minutes of the file (see sign-check.ts). */
  async checkSigns(file: Blob, map: ChannelMap): Promise<EngineResult<SignCheck[]>> {
    const head = new Uint8Array(await file.slice(0, SIGN_CHECK_BYTES).arrayBuffer());
    return guarded(() => checkChannelSigns(head, validateChannelMap(map, inspectLog(head.subarray(0, HEAD_SLICE_BYTES)))));
  },

  /**
   * Unit proposals (time base, damper ranges, lateral acceleration, steering size with the car's data)
   * for the map as it stands, from the first minutes of the file (see unit-checks.ts).
   */
  async checkUnits(file: Blob, map: ChannelMap, car?: { steering_ratio: number; wheelbase_mm: number }): Promise<EngineResult<SignCheck[]>> {
    const head = new Uint8Array(await file.slice(0, SIGN_CHECK_BYTES).arrayBuffer());
    return guarded(() => checkUnitsOnHead(head, validateChannelMap(map, inspectLog(head.subarray(0, HEAD_SLICE_BYTES))), car));
  },

  /**
   * The whole file streamed through the engine (File.stream(), never the whole text), with the same
   * call as the CLI (analyseLog). Progress: bytes, line ends and elapsed time, every 100 ms and at the end.
   */
  async analyse(
    file: Blob,
    car: CarInput,
    map: ChannelMap,
    options: Omit<AnalyseOptions, "onProgress"> = {},
    onProgress?: (p: ReadProgress) => void | Promise<void>,
  ): Promise<EngineResult<SessionSummary>> {
    const started = performance.now();
    let rows = 0, lastReport = -Infinity;
    const report = (bytes: number) => ({ bytes, totalBytes: file.size, rows, elapsedMs: performance.now() - started });
    return guarded(async () => {
      const head = new Uint8Array(await file.slice(0, HEAD_SLICE_BYTES).arrayBuffer());
      const checked = validateChannelMap(map, inspectLog(head));
      const summary = await analyseLog(countingLines(file.stream(), (n) => (rows += n)), car, checked, {
        ...options,
        onProgress: (b) => {
          const now = performance.now();
          if (now - lastReport < PROGRESS_EVERY_MS) return;
          lastReport = now;
          void onProgress?.(report(b));
        },
      });
      // Awaited last call: across a message port it arrives after every earlier one, so the page
      // has seen all progress when the summary lands.
      await onProgress?.(report(file.size));
      return summary;
    });
  },

  /**
   * The whole file in `parts` parts, as the CLI reads a large file on its threads (analyseLogSplit, the
   * same plan for the same part count, so the same summary): part 0 here, the others on the engine
   * workers reached through `helpers` (ports from `connect`, transferred). A small file, or one a part
   * cannot read on its own, is read whole here, as the CLI does. Progress as `analyse` (rows estimated
   * from the head's row length while reading; the count of record at the end).
   */
  async analyseInParts(
    file: Blob,
    car: CarInput,
    map: ChannelMap,
    options: Omit<AnalyseOptions, "onProgress">,
    parts: number,
    helpers: MessagePort[],
    onProgress?: (p: ReadProgress) => void | Promise<void>,
  ): Promise<EngineResult<SessionSummary>> {
    const started = performance.now();
    const remotes = helpers.map((port) => wrap<EngineApi>(port));
    const access = blobAccess(file);
    let lastReport = -Infinity, bytesPerRow = NaN, finished = false;
    const report = (bytes: number, rows: number) => ({ bytes, totalBytes: file.size, rows, elapsedMs: performance.now() - started });
    const runner: PartRunner = async (plan, k, run) => {
      if (k === 0 || remotes.length === 0) return analysePart(access.open(plan.parts[k].readFrom), car, map, options, plan, k, run);
      const remote = remotes[(k - 1) % remotes.length];
      const res = await remote.analysePart(file, car, map, options, plan, k, run.seed, run.onSeed && proxy(run.onSeed), run.onProgress && proxy(run.onProgress));
      // Any failure sends the log to the whole-file run, which reports an input problem exactly.
      if (!res.ok) throw new EngineError(res.code as EngineErrorCode, res.message);
      return res.value;
    };
    try {
      return await guarded(async () => {
        const head = new Uint8Array(await file.slice(0, HEAD_SLICE_BYTES).arrayBuffer());
        const checked = validateChannelMap(map, inspectLog(head));
        let lines = 0;
        for (let i = head.indexOf(10); i >= 0; i = head.indexOf(10, i + 1)) lines++;
        bytesPerRow = lines > 0 ? head.length / lines : NaN;
        const summary = await analyseLogSplit(access, car, checked, {
          ...options,
          parts,
          runner,
          onProgress: (b) => {
            const now = performance.now();
            if (finished || now - lastReport < PROGRESS_EVERY_MS) return;
            lastReport = now;
            void onProgress?.(report(b, Number.isFinite(bytesPerRow) ? Math.round(b / bytesPerRow) : 0));
          },
        });
        // A helper's last progress can come in after the parts are merged (its own port): the end is said once, last.
        finished = true;
        await onProgress?.(report(file.size, summary.log.rows));
        return summary;
      });
    } finally {
      for (const r of remotes) r[releaseProxy]();
      for (const port of helpers) port.close();
    }
  },

  /** Serves this worker's API on one more port too (a helper for another worker's `analyseInParts`). */
  connect(port: MessagePort): void {
    expose(engineApi, port);
  },

  /**
   * For a pool of engine workers (one per core): where to cut the file, or null when it should be
   * analysed whole with `analyse`. Then `analysePart` on each worker and `merge` on one of them.
   */
  async planParts(file: Blob, map: ChannelMap, options: SummaryOptions, parts: number, limits: PlanLimits = {}): Promise<LogPlan | null> {
    try {
      return await planParts(blobAccess(file), map, options, parts, limits);
    } catch {
      return null; // quoted cells: the whole-file run handles them
    }
  },

  /** One part of the plan; `onSeed` hands the static reference on to the next part (see split.ts). */
  async analysePart(
    file: Blob, car: CarInput, map: ChannelMap, options: SummaryOptions, plan: LogPlan, index: number, seed: StaticSeed | null,
    onSeed?: (s: StaticSeed) => void, onProgress?: (ownedBytes: number) => void,
  ): Promise<EngineResult<PartResult>> {
    return guarded(() => analysePart(blobAccess(file).open(plan.parts[index].readFrom), car, map, options, plan, index, { seed, onSeed, onProgress }));
  },

  /** The parts' results, in order, as the session summary. */
  async merge(car: CarInput, map: ChannelMap, options: SummaryOptions, plan: LogPlan, results: PartResult[]): Promise<EngineResult<SessionSummary>> {
    return guarded(() => mergeParts(car, map, options, plan, results));
  },
};

export type EngineApi = typeof engineApi;

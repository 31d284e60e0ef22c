/**
 * What the browser's engine worker offers the page, as a flat async API over app/engine.
 * Kept apart from the worker entry so it can be tested without a Worker global, and so nothing here
 * reaches JSX (the dev server's hot-reload preamble breaks a worker that imports it).
 */
import { analyseLog } from "../app/engine/analyse";
import type { AnalyseOptions } from "../app/engine/analyse";
import { isEngineError } from "../app/engine/errors";
import { inspectLog, suggestChannelMap, validateChannelMap } from "../app/engine/ingest";
import { checkChannelSigns } from "../app/engine/sign-check";
import type { SignCheck } from "../app/engine/sign-check";
import { analysePart, mergeParts, planParts } from "../app/engine/split";
import type { LogFileAccess, LogPlan, PartResult, PlanLimits } from "../app/engine/split";
import type { SessionSummary, StaticSeed } from "../app/engine/summary";
import type { SummaryOptions } from "../app/engine/summary-options";
import type { CarInput, ChannelMap, LogHeader } from "../app/engine/types";

/** Bytes read from the start of a file to show its header and propose a Channel map. */
export const HEAD_SLICE_BYTES = 1 << 18;

/** Bytes read from the start of a file for the sign check (some minutes of running at 100 Hz). */
export const SIGN_CHECK_BYTES = 4 << 20;

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

export const engineApi = {
  /** Header, units row, preamble metadata and a proposed Channel map, from the first bytes of a file. */
  async inspect(file: Blob): Promise<EngineResult<{ header: LogHeader; suggestion: ReturnType<typeof suggestChannelMap> }>> {
    const head = new Uint8Array(await file.slice(0, HEAD_SLICE_BYTES).arrayBuffer());
    return guarded(() => {
      const header = inspectLog(head);
      return { header, suggestion: suggestChannelMap(header) };
    });
  },

  /** Proposes `invert` flips for the map as it stands, from the first minutes of the file (see sign-check.ts). */
  async checkSigns(file: Blob, map: ChannelMap): Promise<EngineResult<SignCheck[]>> {
    const head = new Uint8Array(await file.slice(0, SIGN_CHECK_BYTES).arrayBuffer());
    return guarded(() => checkChannelSigns(head, validateChannelMap(map, inspectLog(head.subarray(0, HEAD_SLICE_BYTES)))));
  },

  /** The whole file streamed through the engine; progress in bytes read. */
  async analyse(
    file: Blob,
    car: CarInput,
    map: ChannelMap,
    options: Omit<AnalyseOptions, "onProgress"> = {},
    onProgress?: (bytesRead: number, totalBytes: number) => void | Promise<void>,
  ): Promise<EngineResult<SessionSummary>> {
    return guarded(async () => {
      const head = new Uint8Array(await file.slice(0, HEAD_SLICE_BYTES).arrayBuffer());
      const checked = validateChannelMap(map, inspectLog(head));
      const summary = await analyseLog(file.stream(), car, checked, { ...options, onProgress: (b) => void onProgress?.(b, file.size) });
      // Awaited last call: across a message port it arrives after every earlier one, so the page
      // has seen all progress when the summary lands.
      await onProgress?.(file.size, file.size);
      return summary;
    });
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

/**
 * What the browser's engine worker offers the page, as a flat async API over app/engine.
 * Kept apart from the worker entry so it can be tested without a Worker global, and so nothing here
 * reaches JSX (the dev server's hot-reload preamble breaks a worker that imports it).
 */
import { analyseLog } from "../app/engine/analyse";
import type { AnalyseOptions } from "../app/engine/analyse";
import { isEngineError } from "../app/engine/errors";
import { inspectLog, suggestChannelMap, validateChannelMap } from "../app/engine/ingest";
import type { SessionSummary } from "../app/engine/summary";
import type { CarInput, ChannelMap, LogHeader } from "../app/engine/types";

/** Bytes read from the start of a file to show its header and propose a Channel map. */
export const HEAD_SLICE_BYTES = 1 << 18;

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

export const engineApi = {
  /** Header, units row, preamble metadata and a proposed Channel map, from the first bytes of a file. */
  async inspect(file: Blob): Promise<EngineResult<{ header: LogHeader; suggestion: ReturnType<typeof suggestChannelMap> }>> {
    const head = new Uint8Array(await file.slice(0, HEAD_SLICE_BYTES).arrayBuffer());
    return guarded(() => {
      const header = inspectLog(head);
      return { header, suggestion: suggestChannelMap(header) };
    });
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
};

export type EngineApi = typeof engineApi;

/**
 * The page's handle on an engine worker (workers/engine.worker.ts) over comlink. One worker per
 * dropped file: reading a file never blocks another, and cancelling a read is ending its worker.
 * Created lazily in the browser only; progress callbacks go through `proxy` and are released after use.
 */
import { proxy, releaseProxy, wrap, type Remote } from "comlink";
import type { EngineApi, ReadProgress } from "../../../workers/engine-api";

export type { ReadProgress } from "../../../workers/engine-api";

export interface EngineHandle {
  api: Remote<EngineApi>;
  /** Ends the worker at once (a read in progress stops where it is). */
  end(): void;
}

export function startEngine(): EngineHandle {
  const worker = new Worker(new URL("../../../workers/engine.worker.ts", import.meta.url), { type: "module", name: "rakeline-engine" });
  const api = wrap<EngineApi>(worker);
  let ended = false;
  return {
    api,
    end() {
      if (ended) return;
      ended = true;
      api[releaseProxy]();
      worker.terminate();
    },
  };
}

/** A progress callback the worker can call across the port. */
export function progressProxy(onProgress: (p: ReadProgress) => void) {
  return proxy(onProgress);
}

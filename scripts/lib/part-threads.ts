/**
 * Node host for analysing one log file in parts on worker threads (app/engine/split.ts).
 * This file is both sides: imported, it gives `analyseFileInParts`; started as a worker thread, it
 * runs one part and posts the result back.
 */
import { availableParallelism } from "node:os";
import { createReadStream, openSync, readSync, closeSync, statSync } from "node:fs";
import { fileURLToPath, pathToFileURL } from "node:url";
import { isMainThread, parentPort, Worker, workerData } from "node:worker_threads";
import { analyseLogSplit, analysePart } from "../../app/engine/split";
import { cachedBundle } from "./bundle-cache.mjs";
import type { LogFileAccess, LogPlan, PartResult, PartRunner, PlanLimits, SplitReport } from "../../app/engine/split";
import type { SessionSummary, StaticSeed } from "../../app/engine/summary";
import type { SummaryOptions } from "../../app/engine/summary-options";
import type { CarInput, ChannelMap } from "../../app/engine/types";

interface PartJob {
  path: string;
  car: CarInput;
  map: ChannelMap;
  options: SummaryOptions;
  plan: LogPlan;
  index: number;
  seed: StaticSeed | null;
  /** Ties the worker's messages to this job (a worker may hold more than one). */
  id: number;
}

type FromWorker = { id: number } & ({ type: "seed"; seed: StaticSeed } | { type: "progress"; bytes: number } | { type: "done"; result: PartResult } | { type: "error"; message: string; name: string });

/** Random access to a file on disk. */
export function fileAccess(path: string): LogFileAccess & { close(): void } {
  const size = statSync(path).size;
  const fd = openSync(path, "r");
  return {
    size,
    async readAt(offset, length) {
      const buf = new Uint8Array(Math.max(0, Math.min(length, size - offset)));
      let got = 0;
      while (got < buf.length) {
        const n = readSync(fd, buf, got, buf.length - got, offset + got);
        if (n === 0) break;
        got += n;
      }
      return got === buf.length ? buf : buf.subarray(0, got);
    },
    open(offset) {
      return createReadStream(path, { start: offset, highWaterMark: 1 << 20 });
    },
    close() {
      closeSync(fd);
    },
  };
}

// The checkout's root: set at build time inside a bundle (see bundle-cache.mjs), else from this file's place.
declare const __RAKELINE_ROOT__: string | undefined;
const ROOT = typeof __RAKELINE_ROOT__ === "string" ? __RAKELINE_ROOT__ : fileURLToPath(new URL("../../", import.meta.url));
const SOURCE = `${ROOT}scripts/lib/part-threads.ts`;

/**
 * The worker's entry: this file and the engine bundled into one plain-JS module (a worker then
 * starts in ~0.1 s instead of ~0.7 s through tsx's loader; see bundle-cache.mjs). Falls back to
 * loading the TypeScript through tsx if the bundler fails.
 */
function workerEntry(): URL {
  const bundle = cachedBundle(ROOT, "part-thread", SOURCE, ["app/engine", "scripts/lib"]);
  return bundle ? pathToFileURL(bundle) : pathToFileURL(`${ROOT}scripts/lib/ts-worker-boot.mjs`);
}

/** Threads worth using here: one per core, at most 4 (each adds ~60 MB resident; the CLI stays under 400 MB). */
export function defaultThreads(): number {
  return Math.max(1, Math.min(4, availableParallelism()));
}

/**
 * Worker threads started ahead of the work (module loading is paid before it), each running one
 * part when asked (parts from 1 on: part 0 runs on the calling thread).
 */
export class PartThreads {
  private readonly workers: Worker[];
  private readonly ready: Promise<void>[];
  private nextId = 1;

  constructor(count: number) {
    const entry = workerEntry();
    this.workers = Array.from({ length: count }, () => new Worker(entry, { workerData: { partThread: true, entry: pathToFileURL(SOURCE).href } }));
    this.ready = this.workers.map((w) => new Promise<void>((resolve, reject) => {
      w.once("message", () => resolve());
      w.once("error", reject);
    }));
    // A worker that fails to start fails its part (and the log runs whole); no one need await this.
    for (const r of this.ready) r.catch(() => {});
  }

  /** Resolves when every worker has loaded the engine. */
  async whenReady(): Promise<void> {
    await Promise.all(this.ready);
  }

  runner(path: string, car: CarInput, map: ChannelMap, options: SummaryOptions): PartRunner {
    return (plan, index, run) => {
      // Part 0 runs on the calling thread; parts 1 … n−1 take the workers in turn.
      const w = this.workers[(index - 1 + this.workers.length) % this.workers.length];
      const job: PartJob = { path, car, map, options, plan, index, seed: run.seed, id: this.nextId++ };
      return new Promise<PartResult>((resolve, reject) => {
        const done = () => {
          w.off("message", onMessage);
          w.off("error", onError);
          w.off("exit", onExit);
        };
        const onMessage = (m: FromWorker) => {
          if (m.id !== job.id) return;
          if (m.type === "seed") run.onSeed?.(m.seed);
          else if (m.type === "progress") run.onProgress?.(m.bytes);
          else {
            done();
            if (m.type === "done") resolve(m.result);
            else reject(Object.assign(new Error(m.message), { name: m.name }));
          }
        };
        const onError = (e: Error) => {
          done();
          reject(e);
        };
        const onExit = (code: number) => {
          done();
          reject(new Error(`the part's worker thread stopped (exit code ${code})`));
        };
        w.on("message", onMessage);
        w.on("error", onError);
        w.on("exit", onExit);
        w.postMessage(job);
      });
    };
  }

  async close(): Promise<void> {
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}

/**
 * analyseLog on a file, in `threads` parts on worker threads (the whole-log run when the file is
 * small or a part cannot stand alone; see split.ts).
 */
export async function analyseFileInParts(
  path: string,
  car: CarInput,
  map: ChannelMap,
  options: SummaryOptions & PlanLimits & { threads?: number; pool?: PartThreads },
  report?: (r: SplitReport) => void,
): Promise<SessionSummary> {
  const { threads = defaultThreads(), pool, minPartBytes, leadInBytes, ...summaryOptions } = options;
  const file = fileAccess(path);
  // The first part runs on this thread, the others on worker threads. The workers start only once
  // the plan says the file is split (a small file runs whole, here, with none).
  let own: PartThreads | null = null;
  let runner: PartRunner | undefined;
  if (threads >= 2) {
    runner = (plan, index, run) => {
      if (!pool && !own) own = new PartThreads(plan.parts.length - 1);
      if (index === 0) return analysePart(file.open(plan.parts[0].readFrom), car, map, summaryOptions, plan, 0, run);
      return (pool ?? own)!.runner(path, car, map, summaryOptions)(plan, index, run);
    };
  }
  try {
    return await analyseLogSplit(
      { size: file.size, readAt: (o, l) => file.readAt(o, l), open: (o) => file.open(o) },
      car,
      map,
      { ...summaryOptions, parts: threads, runner, minPartBytes, leadInBytes },
      report,
    );
  } finally {
    file.close();
    await (own as PartThreads | null)?.close();
  }
}

if (!isMainThread && (workerData as { partThread?: boolean } | null)?.partThread && parentPort) {
  const port = parentPort;
  port.on("message", (job: PartJob) => {
    const post = (m: Omit<FromWorker, "id"> & Partial<FromWorker>) => port.postMessage({ ...m, id: job.id });
    const file = fileAccess(job.path);
    let lastPosted = 0;
    analysePart(file.open(job.plan.parts[job.index].readFrom), job.car, job.map, job.options, job.plan, job.index, {
      seed: job.seed,
      onSeed: (seed) => post({ type: "seed", seed }),
      // Every 8 MB is plenty for a progress bar.
      onProgress: (bytes) => {
        if (bytes - lastPosted >= 8 << 20) post({ type: "progress", bytes: (lastPosted = bytes) });
      },
    }).then(
      (result) => post({ type: "done", result }),
      (e: unknown) => post({ type: "error", message: e instanceof Error ? e.message : String(e), name: e instanceof Error ? e.name : "Error" }),
    ).finally(() => file.close());
  });
  port.postMessage({ id: 0, type: "ready" });
}

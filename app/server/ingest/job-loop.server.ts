/**
 * The job worker's loop: claim a due job, keep its lease alive with heartbeats while it runs, record a
 * failure for a retry (or for good), and on stop() finish the current job within a grace period. A
 * worker that dies leaves its job with a lease that runs out; another worker then claims it again.
 */
import { hostname } from "node:os";
import { randomUUID } from "node:crypto";
import { claimJob, failJob, heartbeat, leaseSeconds, type ClaimedJob } from "../jobs.server";
import { storage } from "../storage.server";
import { sweepStaleUploads } from "./raw-uploads.server";
import { runSessionCheck, type AnalyseFile } from "./recheck.server";

export type JobLoop = { owner: string; done: Promise<void>; stop(graceMs?: number): Promise<void>; jobsRun(): number };

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/**
 * Half-written files of killed processes: a part file not written for a lease period (at least a
 * minute: a live upload writes continually), a spool copy after six hours (written once, then read
 * while its job's lease is renewed; no analysis runs that long).
 */
export async function sweepLeftoverFiles(log: (line: string) => void): Promise<number> {
  try {
    const gone = await storage().sweepLeftovers({ partialOlderThanMs: Math.max(60, leaseSeconds()) * 1000, spoolOlderThanMs: 6 * 3600_000 });
    const n = gone.partial.length + gone.spool.length;
    if (n) log(`removed ${gone.partial.length} half-written upload(s) and ${gone.spool.length} spool cop(ies) left by a stopped process`);
    return n;
  } catch (error) {
    log(`sweeping half-written files failed: ${(error as Error).message}`);
    return 0;
  }
}

export function startJobLoop(options: { analyseFile: AnalyseFile; label?: string; pollMs?: number; sweepEveryMs?: number; log?: (line: string) => void }): JobLoop {
  const owner = `${options.label ?? "worker"}@${hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;
  const log = options.log ?? ((line: string) => console.log(`[job-worker ${owner}] ${line}`));
  const pollMs = options.pollMs ?? 1000;
  let stopping = false;
  let count = 0;
  let wake: (() => void) | null = null;
  // Uploads never made into a session are removed after a day; any worker may do it, a few times an hour.
  const sweepEveryMs = options.sweepEveryMs ?? 15 * 60_000;
  let lastSweep = Date.now() - sweepEveryMs + 60_000;

  async function runOne(job: ClaimedJob): Promise<void> {
    const beat = setInterval(() => {
      heartbeat(job.id, owner)
        .then((held) => held || log(`lost the lease on job ${job.id}; its result will not be written by this worker`))
        .catch((e: unknown) => log(`heartbeat of job ${job.id} failed: ${(e as Error).message}`));
    }, Math.max(500, (leaseSeconds() * 1000) / 3));
    try {
      if (job.kind === "session_check") {
        const outcome = await runSessionCheck(job, owner, options.analyseFile);
        log(`job ${job.id} (session ${job.sessionId}, attempt ${job.attempt}): ${outcome.written ? outcome.status : "lease lost, nothing written"}`);
      } else {
        await failJob(job.id, owner, `Unknown job kind "${job.kind}".`, { retry: false });
      }
    } catch (error) {
      const message = error instanceof Error ? error.message : String(error);
      log(`job ${job.id} failed on attempt ${job.attempt}: ${message}`);
      await failJob(job.id, owner, message).catch((e: unknown) => log(`could not record the failure of job ${job.id}: ${(e as Error).message}`));
    } finally {
      clearInterval(beat);
      count++;
    }
  }

  const done = (async () => {
    // At start-up: what a process killed on this store left half-written.
    await sweepLeftoverFiles(log);
    while (!stopping) {
      let job: ClaimedJob | null = null;
      try {
        job = await claimJob(owner);
      } catch (error) {
        log(`claiming failed (${(error as Error).message}); trying again shortly`);
      }
      if (job) {
        await runOne(job);
        continue;
      }
      if (Date.now() - lastSweep >= sweepEveryMs) {
        lastSweep = Date.now();
        await sweepLeftoverFiles(log);
        await sweepStaleUploads()
          .then((n) => n && log(`removed ${n} upload(s) that never became a session`))
          .catch((e: unknown) => log(`sweeping old uploads failed: ${(e as Error).message}`));
      }
      await new Promise<void>((resolve) => {
        wake = resolve;
        setTimeout(resolve, pollMs);
      });
      wake = null;
    }
  })();

  return {
    owner,
    done,
    jobsRun: () => count,
    async stop(graceMs = 10_000) {
      stopping = true;
      wake?.();
      await Promise.race([done, sleep(graceMs)]);
    },
  };
}

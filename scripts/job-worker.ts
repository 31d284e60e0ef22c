/**
 * A job worker process: `node --import tsx scripts/job-worker.ts` with the app's environment
 * (DATABASE_URL, UPLOAD_DIR or S3_*, JOB_LEASE_S). Runs the queue's jobs (app/server/jobs.server.ts)
 * until SIGTERM or SIGINT, then finishes the current job within 10 s and exits; a job still running
 * then is claimed again by another worker when its lease runs out. The engine runs on worker threads
 * (scripts/lib/part-threads.ts), off any request path. With HEALTH_PORT set it answers /healthz and
 * /readyz there. JOB_POLL_MS (default 1000) is how often an idle worker looks for work.
 */
import { pool } from "../app/server/db.server";
import { databaseCheck, startHealthListener, storageCheck } from "../app/server/health.server";
import { startJobLoop } from "../app/server/ingest/job-loop.server";
import { storage } from "../app/server/storage.server";
import { analyseFileInParts, defaultThreads } from "./lib/part-threads";

// db.server.ts ends the pool on the first SIGTERM/SIGINT (right for the web server); a worker must
// first finish writing its current job, so it handles those signals itself.
process.removeAllListeners("SIGTERM");
process.removeAllListeners("SIGINT");

const threads = Number(process.env.JOB_THREADS) || defaultThreads();
const loop = startJobLoop({
  label: process.env.JOB_WORKER_LABEL || "worker",
  pollMs: Number(process.env.JOB_POLL_MS) || 1000,
  analyseFile: (path, car, map, options) => analyseFileInParts(path, car, map, { ...options, threads }),
});

if (process.env.HEALTH_PORT) {
  await startHealthListener({ port: Number(process.env.HEALTH_PORT), role: "worker", checks: { database: databaseCheck(pool), storage: storageCheck(storage()) } });
}
console.log(`[job-worker] ${loop.owner} ready (lease ${process.env.JOB_LEASE_S || 60} s, ${threads} engine threads)`);

let stopping = false;
async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`[job-worker] ${signal}: finishing the current job (at most 10 s)`);
  await loop.stop(10_000);
  await pool.end().catch(() => undefined);
  process.exit(0);
}
process.on("SIGTERM", () => void stop("SIGTERM"));
process.on("SIGINT", () => void stop("SIGINT"));

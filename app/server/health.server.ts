/**
 * Health of one process, for the proxy, the launcher and monitoring (see "Running at scale" in the README):
 * - liveness (`/healthz`): the process runs and its event loop answers; it touches nothing shared, so a
 *   database fail-over never makes every process look dead at once;
 * - readiness (`/readyz`): this process can do its work now: the database answers through its pool and
 *   the raw-file storage answers (the S3 bucket, or the upload folder on disk).
 * App processes answer both as routes (app/routes/health/); job workers answer the same bodies from a
 * small HTTP listener (`startHealthListener`).
 */
import { createServer, type Server } from "node:http";
import type { Pool } from "mysql2/promise";

export type ProcessRole = "app" | "worker";

export interface CheckResult {
  ok: boolean;
  ms: number;
  /** What was checked, or what failed, in a sentence. */
  detail: string;
}

export type Check = () => Promise<CheckResult>;

const startedAt = Date.now();

export function liveness(role: ProcessRole) {
  const memory = process.memoryUsage();
  return {
    status: "ok" as const,
    role,
    pid: process.pid,
    uptime_s: Math.round((Date.now() - startedAt) / 1000),
    rss_mb: Math.round(memory.rss / 1e5) / 10,
    heap_used_mb: Math.round(memory.heapUsed / 1e5) / 10,
  };
}

function withTimeout<T>(work: Promise<T>, ms: number, what: string): Promise<T> {
  let timer: ReturnType<typeof setTimeout> | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${what} did not answer within ${ms} ms`)), ms);
  });
  return Promise.race([work, timeout]).finally(() => clearTimeout(timer));
}

/** Runs a check, turning a throw or a timeout into a failed result with the reason. */
export async function timedCheck(what: string, body: () => Promise<string>, timeoutMs = 2000): Promise<CheckResult> {
  const started = performance.now();
  try {
    const detail = await withTimeout(body(), timeoutMs, what);
    return { ok: true, ms: Math.round(performance.now() - started), detail };
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    return { ok: false, ms: Math.round(performance.now() - started), detail: `${what}: ${message}` };
  }
}

/** The database answers a query through this process's pool (behind the proxy: the current writer node). */
export function databaseCheck(pool: Pool, timeoutMs = 2000): Check {
  return () =>
    timedCheck(
      "database",
      async () => {
        await pool.query("SELECT 1");
        return "the database answers";
      },
      timeoutMs,
    );
}

/**
 * The raw-file storage answers: the S3 bucket exists and our credentials reach it (HeadBucket), or the
 * upload folder can be made. `ready` is the store's own probe (app/server/storage.server.ts).
 */
export function storageCheck(store: { kind: string; ready(): Promise<void> }, timeoutMs = 2000): Check {
  return () =>
    timedCheck(
      "storage",
      async () => {
        await store.ready();
        return store.kind === "s3" ? "the S3 bucket answers" : "the upload folder is there";
      },
      timeoutMs,
    );
}

/** Runs every check; ready only when all pass. */
export async function readiness(role: ProcessRole, checks: Record<string, Check>) {
  const names = Object.keys(checks);
  const results = await Promise.all(names.map((name) => checks[name]()));
  const byName = Object.fromEntries(names.map((name, i) => [name, results[i]]));
  const ok = results.every((r) => r.ok);
  return { ok, body: { status: ok ? ("ready" as const) : ("not_ready" as const), role, pid: process.pid, checks: byName } };
}

const NO_STORE = { "Cache-Control": "no-store" };

export function livenessResponse(role: ProcessRole): Response {
  return Response.json(liveness(role), { headers: NO_STORE });
}

export async function readinessResponse(role: ProcessRole, checks: Record<string, Check>): Promise<Response> {
  const { ok, body } = await readiness(role, checks);
  return Response.json(body, { status: ok ? 200 : 503, headers: NO_STORE });
}

/**
 * A loopback HTTP listener answering GET /healthz and /readyz for a process that serves nothing else
 * (a job worker). Resolves once it listens.
 */
export async function startHealthListener(options: { port: number; host?: string; role: ProcessRole; checks: Record<string, Check> }): Promise<Server> {
  const server = createServer(async (req, res) => {
    const path = (req.url ?? "/").split("?")[0];
    let response: Response;
    if (req.method !== "GET" && req.method !== "HEAD") response = Response.json({ error: "Use GET." }, { status: 405 });
    else if (path === "/healthz") response = livenessResponse(options.role);
    else if (path === "/readyz") response = await readinessResponse(options.role, options.checks);
    else response = Response.json({ error: "No such resource: this process answers /healthz and /readyz." }, { status: 404 });
    res.writeHead(response.status, Object.fromEntries(response.headers));
    res.end(req.method === "HEAD" ? undefined : await response.text());
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, options.host ?? "127.0.0.1", () => resolve());
  });
  // It must never keep a stopping worker alive.
  server.unref();
  return server;
}

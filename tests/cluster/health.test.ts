// Health routes: /healthz answers without touching the database; /readyz answers 200 only when the
// database answers through the process's pool, and 503 naming the failed check otherwise. The
// status codes follow the usual liveness/readiness convention (common practice: 200 when
// healthy, 503 Service Unavailable when not, RFC 9110 §15.6.4).
import { createServer } from "node:net";
import mysql from "mysql2/promise";
import { afterAll, describe, expect, it } from "vitest";
import { loader as healthz } from "~/routes/health/healthz";
import { loader as readyz } from "~/routes/health/readyz";
import { databaseCheck, readinessResponse, startHealthListener } from "~/server/health.server";

/** A loopback port with nothing listening on it (taken from the OS, then released). */
async function closedPort(): Promise<number> {
  const server = createServer();
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const port = (server.address() as { port: number }).port;
  await new Promise<void>((resolve) => server.close(() => resolve()));
  return port;
}

const pools: mysql.Pool[] = [];
afterAll(async () => {
  await Promise.all(pools.map((p) => p.end()));
});

describe("app process health routes", () => {
  it("/healthz says the process is alive, with its pid and memory", async () => {
    const response = healthz();
    expect(response.status).toBe(200);
    expect(response.headers.get("cache-control")).toBe("no-store");
    const body = await response.json();
    expect(body).toMatchObject({ status: "ok", role: "app", pid: process.pid });
    expect(body.rss_mb).toBeGreaterThan(0);
  });

  it("/readyz is ready when the test database answers", async () => {
    const response = await readyz();
    const body = await response.json();
    expect(response.status).toBe(200);
    expect(body.status).toBe("ready");
    expect(body.checks.database).toMatchObject({ ok: true, detail: "the database answers" });
  });

  it("readiness is 503 and names the database when nothing answers on its port", async () => {
    const port = await closedPort();
    const pool = mysql.createPool({ host: "127.0.0.1", port, user: "nobody", connectTimeout: 1000, connectionLimit: 1 });
    pools.push(pool);
    const response = await readinessResponse("app", { database: databaseCheck(pool, 1500) });
    expect(response.status).toBe(503);
    const body = await response.json();
    expect(body.status).toBe("not_ready");
    expect(body.checks.database.ok).toBe(false);
    expect(body.checks.database.detail).toMatch(/^database: /);
    expect(body.checks.database.detail).toMatch(/ECONNREFUSED|did not answer/);
  });
});

describe("job worker health listener", () => {
  it("answers /healthz and /readyz over HTTP, 404 elsewhere and 405 for other methods", async () => {
    const port = await closedPort();
    let databaseUp = true;
    const server = await startHealthListener({
      port,
      role: "worker",
      checks: { database: async () => ({ ok: databaseUp, ms: 0, detail: databaseUp ? "up" : "database: down" }) },
    });
    try {
      const base = `http://127.0.0.1:${port}`;
      const live = await fetch(`${base}/healthz`);
      expect(live.status).toBe(200);
      expect(await live.json()).toMatchObject({ status: "ok", role: "worker" });
      expect((await fetch(`${base}/readyz`)).status).toBe(200);
      databaseUp = false;
      const notReady = await fetch(`${base}/readyz`);
      expect(notReady.status).toBe(503);
      expect((await notReady.json()).checks.database.detail).toBe("database: down");
      expect((await fetch(`${base}/anything`)).status).toBe(404);
      expect((await fetch(`${base}/healthz`, { method: "POST" })).status).toBe(405);
    } finally {
      await new Promise((resolve) => server.close(resolve));
    }
  });
});

// Health routes: /healthz answers without touching the database; /readyz answers 200 only when the
// database answers through the process's pool, and 503 naming the failed check otherwise. The
// status codes follow the usual liveness/readiness convention (common practice: 200 when
// healthy, 503 Service Unavailable when not, RFC 9110 §15.6.4).
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import path from "node:path";
import mysql from "mysql2/promise";
import { afterAll, describe, expect, it } from "vitest";
import { loader as healthz } from "~/routes/health/healthz";
import { loader as readyz } from "~/routes/health/readyz";
import { databaseCheck, readinessResponse, startHealthListener, storageCheck } from "~/server/health.server";
import { createStorage } from "~/server/storage.server";

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

  it("/readyz is ready when the test database and the storage answer", async () => {
    const response = await readyz();
    const body = await response.json();
    expect(response.status).toBe(200);
    expect(body.status).toBe("ready");
    expect(body.checks.database).toMatchObject({ ok: true, detail: "the database answers" });
    expect(body.checks.storage.ok).toBe(true);
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

describe("storage readiness", () => {
  const scratch = mkdtempSync(path.join(tmpdir(), "rakeline-health-"));
  afterAll(() => rmSync(scratch, { recursive: true, force: true }));

  it("is ready when the upload folder can be made, and names the storage when it cannot", async () => {
    const ok = await storageCheck(createStorage({ kind: "fs", dir: path.join(scratch, "uploads") }))();
    expect(ok).toMatchObject({ ok: true, detail: "the upload folder is there" });
    // A plain file where the folder should be: mkdir fails with ENOTDIR/EEXIST.
    const blocker = path.join(scratch, "a-file");
    writeFileSync(blocker, "x");
    const response = await readinessResponse("app", { storage: storageCheck(createStorage({ kind: "fs", dir: path.join(blocker, "uploads") })) });
    expect(response.status).toBe(503);
    const body = await response.json();
    expect(body.checks.storage.ok).toBe(false);
    expect(body.checks.storage.detail).toMatch(/^storage: .*(ENOTDIR|EEXIST)/);
  });

  it("checks the S3 bucket: ready on the fake's bucket, 503 naming the storage for a bucket that does not exist", async (context) => {
    if (!process.env.S3_TEST_ENDPOINT) return context.skip();
    const s3 = (bucket: string) =>
      createStorage({
        kind: "s3",
        bucket,
        endpoint: process.env.S3_TEST_ENDPOINT,
        region: process.env.S3_TEST_REGION ?? "us-east-1",
        accessKeyId: process.env.S3_TEST_ACCESS_KEY_ID,
        secretAccessKey: process.env.S3_TEST_SECRET_ACCESS_KEY,
        forcePathStyle: true,
        spoolDir: scratch,
      });
    expect(await storageCheck(s3(process.env.S3_TEST_BUCKET!))()).toMatchObject({ ok: true, detail: "the S3 bucket answers" });
    const missing = await storageCheck(s3("no-such-bucket-here"))();
    expect(missing.ok).toBe(false);
    expect(missing.detail).toMatch(/^storage: /);
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

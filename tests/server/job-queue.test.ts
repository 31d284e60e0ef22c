// The job queue (app/server/jobs.server.ts) and the job worker process (scripts/job-worker.ts):
// one claim per job, leases that run out when a worker dies, results written only by the lease owner,
// and two real worker processes doing every job exactly once. The server's re-check of a browser
// upload is held to the browser's figures (the same engine on the same bytes: within rounding).
import { spawn, type ChildProcess } from "node:child_process";
import { readFileSync } from "node:fs";
import mysql from "mysql2/promise";
import { and, eq, inArray, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { jobs } from "~/db/schema/jobs";
import { analysisSessions, sessionResults } from "~/db/schema/sessions";
import { db } from "~/server/db.server";
import { engineOptionsOf, type SessionDetails } from "~/lib/sessions/details";
import { claimJob, completeJob, enqueueJob, failJob, heartbeat } from "~/server/jobs.server";
import { storeSessionOfRecord } from "~/server/ingest/store.server";
import { putStream } from "~/server/storage.server";
import { browserSummary, ingestWorld, LOGS, mapOf } from "./ingest-support";
import { sleep, until } from "./helpers/wait";

let w: Awaited<ReturnType<typeof ingestWorld>>;
const workers: ChildProcess[] = [];
beforeAll(async () => {
  w = await ingestWorld("jobs");
});
afterAll(async () => {
  for (const child of workers) if (child.exitCode === null) child.kill("SIGKILL");
});

function startWorker(label: string, env: Record<string, string> = {}): ChildProcess {
  const child = spawn(process.execPath, ["--import", "tsx", "scripts/job-worker.ts"], {
    env: { ...process.env, JOB_WORKER_LABEL: label, JOB_POLL_MS: "100", JOB_LEASE_S: "3", JOB_THREADS: "1", ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let output = "";
  child.stdout!.on("data", (d) => (output += d));
  child.stderr!.on("data", (d) => (output += d));
  child.on("exit", (code, signal) => {
    if (code && code !== 0) console.error(`worker ${label} exited ${code} ${signal}:\n${output}`);
  });
  workers.push(child);
  return child;
}

function stopWorker(child: ChildProcess): Promise<void> {
  return new Promise((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) return resolve();
    child.once("exit", () => resolve());
    child.kill("SIGTERM");
  });
}

/** A session as the Drop a log page stores it (browser summary, re-check job queued). */
async function browserSession(log: string, carName: "marlin-sr2" | "vesper-gt4r", date: string) {
  const file = `${LOGS}/${log}.csv`;
  const raw = await putStream(Buffer.from(readFileSync(file)) as unknown as AsyncIterable<Uint8Array>, { keyPrefix: `teams/${w.teamId}` });
  const details: SessionDetails = { carId: w.cars[carName].carId, setupId: w.cars[carName].setupId, date, venueName: "Kestrel Bank Raceway" };
  const options = engineOptionsOf(details, { venueAltitudeM: null, carFuelDensityKgPerL: 0.745 });
  const summary = await browserSummary(w.teamId, w.cars[carName], file, mapOf(log), options);
  const { traces, ...rest } = summary;
  const stored = await storeSessionOfRecord({
    teamId: w.teamId, teamSlug: w.slug, userId: w.userId, source: "browser",
    raw: { ...raw, fileName: `${log}.csv` }, details, map: mapOf(log) as never, options,
    summary: rest, traces, engineVersion: `summary-v${summary.summary_version}`, origin: "browser",
  });
  if (!stored.ok) throw new Error(stored.error);
  return stored.id;
}

const jobOf = async (sessionId: string) => (await db.select().from(jobs).where(eq(jobs.sessionId, sessionId)))[0];

describe("claims and leases", () => {
  it("one claim per job; the lease runs out; only the lease owner writes; the last attempt gives up", async () => {
    const id = await enqueueJob(db, { kind: "session_check", teamId: w.teamId, payload: { reason: "recheck" } });
    const a = await claimJob("worker-a", { teamId: w.teamId });
    expect(a?.id).toBe(id);
    expect(a?.attempt).toBe(1);
    expect(await claimJob("worker-b", { teamId: w.teamId })).toBeNull();
    expect(await heartbeat(id, "worker-a")).toBe(true);
    expect(await heartbeat(id, "worker-b")).toBe(false);

    // worker-a stops answering: its lease runs out and worker-b takes the job over.
    await db.update(jobs).set({ leaseExpiresAt: sql`NOW(3) - INTERVAL 1 SECOND` }).where(eq(jobs.id, id));
    const b = await claimJob("worker-b", { teamId: w.teamId });
    expect([b?.id, b?.attempt]).toEqual([id, 2]);
    let wroteA = false;
    expect(await completeJob(id, "worker-a", async () => { wroteA = true; })).toBe(false);
    expect(wroteA).toBe(false);
    expect(await completeJob(id, "worker-b", async () => undefined)).toBe(true);
    expect((await db.select().from(jobs).where(eq(jobs.id, id)))[0]).toMatchObject({ status: "done", attempts: 2, leaseOwner: "worker-b" });

    const last = await enqueueJob(db, { kind: "session_check", teamId: w.teamId, maxAttempts: 1 });
    expect((await claimJob("worker-c", { teamId: w.teamId }))?.id).toBe(last);
    await db.update(jobs).set({ leaseExpiresAt: sql`NOW(3) - INTERVAL 1 SECOND` }).where(eq(jobs.id, last));
    expect(await claimJob("worker-d", { teamId: w.teamId })).toBeNull();
    const [gaveUp] = await db.select().from(jobs).where(eq(jobs.id, last));
    expect(gaveUp.status).toBe("failed");
    expect(gaveUp.error).toMatch(/stopped without finishing it, on its only attempt/);
  });

  it("a failed attempt is queued again later, and fails for good after max_attempts", async () => {
    const id = await enqueueJob(db, { kind: "session_check", teamId: w.teamId, maxAttempts: 2 });
    await claimJob("w1", { teamId: w.teamId });
    expect(await failJob(id, "w1", "storage did not answer")).toBe(true);
    const [again] = await db.select().from(jobs).where(eq(jobs.id, id));
    expect(again.status).toBe("queued");
    expect(await claimJob("w2", { teamId: w.teamId })).toBeNull(); // backing off
    await db.update(jobs).set({ runAfter: sql`NOW(3)` }).where(eq(jobs.id, id));
    expect((await claimJob("w2", { teamId: w.teamId }))?.attempt).toBe(2);
    await failJob(id, "w2", "storage did not answer");
    expect((await db.select().from(jobs).where(eq(jobs.id, id)))[0]).toMatchObject({ status: "failed", error: "storage did not answer" });
  });
});

describe("job worker processes", () => {
  it("two workers do every re-check exactly once, and the server agrees with the browser (checked)", async () => {
    const ids = [
      await browserSession("marlin-kestrel-comma", "marlin-sr2", "2026-05-16"),
      await browserSession("marlin-kestrel-semicolon", "marlin-sr2", "2026-05-16"),
      await browserSession("marlin-kestrel-splitter", "marlin-sr2", "2026-05-17"),
      await browserSession("vesper-kestrel-tab", "vesper-gt4r", "2026-05-17"),
    ];
    const one = startWorker("one");
    const two = startWorker("two");
    const done = await until("every re-check", async () => {
      const rows = await db.select().from(jobs).where(inArray(jobs.sessionId, ids));
      return rows.length === ids.length && rows.every((r) => r.status === "done") && rows;
    }, 60_000);
    expect(done.map((r) => r.attempts)).toEqual(ids.map(() => 1));
    for (const id of ids) {
      const results = await db.select().from(sessionResults).where(and(eq(sessionResults.sessionId, id), eq(sessionResults.origin, "server")));
      expect(results).toHaveLength(1);
      const [session] = await db.select().from(analysisSessions).where(eq(analysisSessions.id, id));
      expect([session.status, session.statusDetail]).toEqual(["checked", "The server's re-check of the stored file agrees with the browser's figures."]);
    }
    await Promise.all([stopWorker(one), stopWorker(two)]);
  }, 180_000);

  it("a job whose worker dies is claimed again after its lease and done once", async () => {
    const id = await browserSession("vesper-coldwater-comma", "vesper-gt4r", "2026-05-18");
    // Hold the session row so the first worker blocks while writing its result, then kill it there.
    const holder = await mysql.createConnection({ uri: process.env.DATABASE_URL!, timezone: "Z" });
    await holder.beginTransaction();
    await holder.query("SELECT id FROM analysis_sessions WHERE id = ? FOR UPDATE", [id]);
    const doomed = startWorker("doomed", { JOB_LEASE_S: "2" });
    await until("the first worker to claim the job", async () => {
      const job = await jobOf(id);
      return job.status === "running" && job.leaseOwner?.startsWith("doomed@") && job;
    }, 60_000);
    // The second worker starts now: the job is leased, so it waits for the lease to run out.
    const rescuer = startWorker("rescuer");
    // The first has the engine's result and waits on the row lock inside its write.
    await sleep(1500);
    doomed.kill("SIGKILL");
    await new Promise((r) => doomed.once("exit", r));
    await holder.rollback();
    await holder.end();

    const job = await until("the job done by another worker", async () => {
      const row = await jobOf(id);
      return row.status === "done" && row;
    }, 60_000);
    expect(job.attempts).toBe(2);
    expect(job.leaseOwner?.startsWith("rescuer@")).toBe(true);
    expect(await db.select().from(sessionResults).where(and(eq(sessionResults.sessionId, id), eq(sessionResults.origin, "server")))).toHaveLength(1);
    await stopWorker(rescuer);
  }, 180_000);
});

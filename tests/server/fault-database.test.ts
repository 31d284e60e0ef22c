// Fault: MariaDB stops (killed: a crash) in the middle of an ingest, through the Drop a log page's
// POST /api/t/:teamSlug/sessions and the headless POST /api/sessions. What must hold (issue 12, item 8;
// issue 10, item 9): no partial session (InnoDB rolls back an uncommitted transaction on recovery: MariaDB
// Knowledge Base, "InnoDB Recovery Modes"/crash recovery), a clear 503 while the database is down, the
// stored raw upload kept for a later try, and the same request succeeding once the database is back.
// The request is caught mid-transaction by a table lock on `audit_log` (the store writes the session, its
// bands, first result and re-check job, then the audit event), seen waiting in the process list, and the
// server is killed right there. A private MariaDB (tests/server/fault-support.ts) keeps the other files' database up.
import { existsSync, readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import type mysql from "mysql2/promise";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { engineVersionOf } from "~/lib/engine-version";
import { startPrivateDatabase, until, waitForBlockedQuery, type PrivateDb } from "./fault-support";

type App = {
  db: typeof import("~/server/db.server");
  schema: typeof import("~/db/schema/sessions") & typeof import("~/db/schema/jobs") & typeof import("~/db/schema/audit");
  orm: typeof import("drizzle-orm");
  support: typeof import("./ingest-support");
  auth: typeof import("./auth-support");
  uploadsRoute: typeof import("~/routes/api/uploads");
  teamSessionsRoute: typeof import("~/routes/api/team-sessions");
  apiSessionsRoute: typeof import("~/routes/api/sessions");
  tokens: typeof import("~/server/api-tokens.server");
  storage: typeof import("~/server/storage.server");
};

let pdb: PrivateDb;
const cleanups: Array<() => Promise<unknown>> = [];
afterEach(async () => {
  for (const clean of cleanups.splice(0)) await clean().catch(() => undefined);
});
let app: App;
let w: Awaited<ReturnType<App["support"]["ingestWorld"]>>;

beforeAll(async () => {
  pdb = await startPrivateDatabase();
  app = {
    db: await import("~/server/db.server"),
    schema: { ...(await import("~/db/schema/sessions")), ...(await import("~/db/schema/jobs")), ...(await import("~/db/schema/audit")) },
    orm: await import("drizzle-orm"),
    support: await import("./ingest-support"),
    auth: await import("./auth-support"),
    uploadsRoute: await import("~/routes/api/uploads"),
    teamSessionsRoute: await import("~/routes/api/team-sessions"),
    apiSessionsRoute: await import("~/routes/api/sessions"),
    tokens: await import("~/server/api-tokens.server"),
    storage: await import("~/server/storage.server"),
  };
  w = await app.support.ingestWorld("fault");
}, 120_000);

afterAll(async () => {
  await app?.db.pool.end().catch(() => undefined);
  await pdb?.stop();
}, 60_000);

/** What the team has in every table an ingest writes. */
async function stored(teamId: string) {
  const { db } = app.db;
  const { eq, count } = app.orm;
  const s = app.schema;
  const n = async (table: typeof s.analysisSessions | typeof s.sessionResults | typeof s.jobs | typeof s.rawUploads, column: typeof s.analysisSessions.teamId) =>
    Number((await db.select({ n: count() }).from(table as typeof s.analysisSessions).where(eq(column, teamId)))[0].n);
  const bands = Number(
    (await db.select({ n: count() }).from(s.sessionBands).innerJoin(s.analysisSessions, eq(s.sessionBands.sessionId, s.analysisSessions.id)).where(eq(s.analysisSessions.teamId, teamId)))[0].n,
  );
  const uploads = await db.select().from(s.rawUploads).where(eq(s.rawUploads.teamId, teamId));
  const uploadedEvents = (await db.select().from(s.auditLog).where(eq(s.auditLog.teamId, teamId))).filter((e) => e.action === "session_uploaded").length;
  return {
    sessions: await n(s.analysisSessions, s.analysisSessions.teamId),
    bands,
    results: await n(s.sessionResults, s.sessionResults.teamId as never),
    jobs: await n(s.jobs, s.jobs.teamId as never),
    uploads: uploads.map((u) => ({ id: u.id, status: u.status, key: u.storageKey })),
    uploadedEvents,
  };
}

function teamFiles(teamId: string): string[] {
  const dir = path.join((app.storage.storage().config as { dir: string }).dir, "teams", teamId);
  return existsSync(dir) ? readdirSync(dir) : [];
}

/**
 * Holds `LOCK TABLES audit_log WRITE` on a connection of its own: an ingest's transaction waits at its
 * last statement, the session_uploaded event, after the session, bands, first result, upload and job rows.
 * (A lock on `jobs` would stop it earlier: MariaDB locks a child table's metadata when its parent,
 * analysis_sessions, is written.)
 */
async function lockAudit(): Promise<mysql.Connection> {
  const holder = await pdb.connect();
  holder.on("error", () => undefined);
  await holder.query("LOCK TABLES audit_log WRITE");
  return holder;
}

/** Uncommitted rows of the waiting transaction, read with READ UNCOMMITTED (the partial session in flight). */
async function inFlightSessions(watch: mysql.Connection, teamId: string): Promise<number> {
  await watch.query("SET SESSION TRANSACTION ISOLATION LEVEL READ UNCOMMITTED");
  const [rows] = await watch.query<mysql.RowDataPacket[]>("SELECT COUNT(*) AS n FROM analysis_sessions WHERE team_id = ?", [teamId]);
  return Number(rows[0].n);
}

/** The request waiting at the lock; if it answered instead, the test fails with its answer (and the lock is let go). */
async function blockedOrAnswered(watch: mysql.Connection, pending: Promise<{ status: number; body: unknown }>, holder: mysql.Connection): Promise<string> {
  let answered: { status: number; body: unknown } | null = null;
  void pending.then((a) => (answered = a), (e: unknown) => (answered = { status: -1, body: String(e) }));
  try {
    return await Promise.race([
      waitForBlockedQuery(watch, /^insert into `audit_log`/i, 45_000),
      (async () => {
        while (!answered) await new Promise((r) => setTimeout(r, 50));
        throw new Error(`the request answered before reaching the lock: ${JSON.stringify(answered).slice(0, 500)}`);
      })(),
    ]);
  } catch (error) {
    await holder.end().catch(() => undefined);
    throw error;
  }
}

/**
 * Runs `post` until it waits at its last statement (the audit insert, held by a table lock), counts the
 * team's sessions as that uncommitted transaction sees them, then kills MariaDB: where it waited, that
 * count, and the answer the request gives.
 */
async function killWhileHeld<T extends { status: number; body: unknown }>(post: () => Promise<T>, teamId: string) {
  const holder = await lockAudit();
  const watch = await pdb.connect();
  watch.on("error", () => undefined);
  cleanups.push(() => holder.end(), () => watch.end());
  const pending = post();
  const waiting = await blockedOrAnswered(watch, pending, holder);
  const inFlight = await inFlightSessions(watch, teamId);
  await pdb.kill();
  return { waiting, inFlight, during: await pending };
}

const LOG = "marlin-kestrel-comma";

describe("fault: MariaDB stopped in the middle of an ingest", () => {
  it("Drop a log (POST /api/t/:team/sessions): 503 while down, no partial session, the upload kept and used once the database is back", async () => {
    const { support, auth } = app;
    const bytes = readFileSync(`${support.LOGS}/${LOG}.csv`);
    // A venue the team has already (a new one would write its own audit event first).
    const venueId = (await import("node:crypto")).randomUUID();
    await app.db.db.insert(app.schema.venues).values({ id: venueId, teamId: w.teamId, name: "Kestrel Bank Raceway", createdAt: new Date() });
    const up = await auth.outcome(() => app.uploadsRoute.action(auth.args(support.uploadRequest(w.slug, w.jar, `${LOG}.csv`, bytes), { teamSlug: w.slug }) as never));
    expect(up.status).toBe(201);
    const uploadId = (up.body as { upload: { id: string } }).upload.id;

    const summary = await support.browserSummary(w.teamId, w.cars["marlin-sr2"], `${support.LOGS}/${LOG}.csv`, support.mapOf(LOG));
    const { traces, ...rest } = summary;
    const body = {
      uploadId,
      details: { carId: w.cars["marlin-sr2"].carId, setupId: w.cars["marlin-sr2"].setupId, date: "2026-05-16", venueId, run: "Run 4" },
      map: support.mapOf(LOG),
      browser: { summary: rest, traces, engineVersion: engineVersionOf(summary) },
    };
    const post = () => auth.outcome(() => app.teamSessionsRoute.action(auth.args(support.jsonPost(`/api/t/${w.slug}/sessions`, body, w.jar), { teamSlug: w.slug }) as never));
    const before = await stored(w.teamId);
    expect(before.uploads).toEqual([{ id: uploadId, status: "stored", key: expect.any(String) }]);

    const { waiting, inFlight, during } = await killWhileHeld(post, w.teamId);
    expect(inFlight).toBe(1);
    expect(during.status).toBe(503);
    expect((during.body as { error: string }).error).toMatch(/database is not answering, so nothing was stored/);
    // Sent again while the database is still down: the same clear answer.
    const again = await post();
    expect(again.status).toBe(503);
    // The raw file is still in storage.
    expect(teamFiles(w.teamId)).toContain(before.uploads[0].key.split("/").pop());

    await pdb.restart();
    const after = await stored(w.teamId);
    expect(after).toMatchObject({ sessions: 0, bands: 0, results: 0, jobs: 0, uploadedEvents: 0 });
    expect(after.uploads).toEqual(before.uploads);

    const retried = await post();
    expect(retried.status).toBe(201);
    const done = await stored(w.teamId);
    expect(done).toMatchObject({ sessions: 1, bands: summary.bands.length, results: 1, jobs: 1, uploadedEvents: 1 });
    expect(done.uploads.map((u) => u.status)).toEqual(["attached"]);
    console.log(
      `fault: MariaDB killed mid-ingest (page; request waiting at "${waiting}", ${inFlight} uncommitted session row) → 503 during and on a retry while down, ` +
        `0 sessions/bands/results/jobs after restart, upload kept (stored); same request after restart → 201 with ${done.bands} bands, 1 result, 1 job: held`,
    );
  }, 90_000);

  it("Drop a log's upload (POST /api/t/:team/uploads) while the file streams in: 503, no file or part file kept, the same upload works once the database is back", async () => {
    const { support, auth } = app;
    const bytes = readFileSync(`${support.LOGS}/vesper-coldwater-comma.csv`);
    const partDir = path.join((app.storage.storage().config as { dir: string }).dir, ".partial");
    const parts = () => (existsSync(partDir) ? readdirSync(partDir) : []);
    const before = { files: teamFiles(w.teamId).length, parts: parts().length, uploads: (await stored(w.teamId)).uploads.length };
    // A client sending the file slowly: the first half now, the rest once the database is gone.
    const boundary = "----fault";
    let controller!: ReadableStreamDefaultController<Uint8Array>;
    const body = new ReadableStream<Uint8Array>({ start: (c) => void (controller = c) });
    controller.enqueue(support.multipartFileHead(boundary, "vesper-coldwater-comma.csv"));
    controller.enqueue(new Uint8Array(bytes.subarray(0, bytes.length >> 1)));
    const request = support.streamedUploadRequest(w.slug, w.jar, boundary, body);
    const pending = auth.outcome(() => app.uploadsRoute.action(auth.args(request, { teamSlug: w.slug }) as never));
    // Signed in and streaming into storage: its part file is there.
    await until("the upload's part file", () => parts().length > before.parts, 20_000);
    await pdb.kill();
    controller.enqueue(new Uint8Array(bytes.subarray(bytes.length >> 1)));
    controller.enqueue(support.multipartTail(boundary));
    controller.close();
    const during = await pending;
    expect(during.status).toBe(503);
    expect((during.body as { error: string }).error).toMatch(/database is not answering/);
    // No row can point at the file, so it is not kept; nor is its part file.
    expect(teamFiles(w.teamId).length).toBe(before.files);
    expect(parts().length).toBe(before.parts);

    await pdb.restart();
    expect((await stored(w.teamId)).uploads.length).toBe(before.uploads);
    const again = await auth.outcome(() => app.uploadsRoute.action(auth.args(support.uploadRequest(w.slug, w.jar, "vesper-coldwater-comma.csv", bytes), { teamSlug: w.slug }) as never));
    expect(again.status).toBe(201);
    expect(teamFiles(w.teamId).length).toBe(before.files + 1);
    console.log("fault: MariaDB killed while a page upload streamed in → 503 once the file arrived, no file, part file or row kept; the same upload after restart → 201: held");
  }, 90_000);

  it("headless POST /api/sessions: 503 while down, no partial session, the stored file reused once the database is back", async () => {
    const { support, auth } = app;
    const made = await app.tokens.createApiToken(w.userId, w.slug, "Pit laptop");
    if (!made.ok) throw new Error("token");
    const log = "vesper-kestrel-tab";
    const bytes = readFileSync(`${support.LOGS}/${log}.csv`);
    const request = () => {
      const form = new FormData();
      form.set("meta", JSON.stringify({ car: "Vesper GT4-R", map: support.mapOf(log), date: "2026-05-17", run: "Run 1" }));
      form.set("file", new File([new Uint8Array(bytes)], `${log}.csv`, { type: "text/csv" }));
      return new Request(`${auth.appUrl}/api/sessions`, { method: "POST", headers: { authorization: `Bearer ${made.token}` }, body: form });
    };
    const post = () => auth.outcome(() => app.apiSessionsRoute.action(auth.args(request()) as never));
    const before = await stored(w.teamId);
    const filesBefore = teamFiles(w.teamId).length;

    const { waiting, inFlight, during } = await killWhileHeld(post, w.teamId);
    expect(inFlight).toBe(before.sessions + 1);
    expect(during.status).toBe(503);
    expect((during.body as { error: string }).error).toMatch(/database is not answering, so no session was stored. Send the same request again/);
    // The file this request stored is kept (its row is committed; removing it needs the database).
    expect(teamFiles(w.teamId).length).toBe(filesBefore + 1);
    const whileDown = await post();
    expect(whileDown.status).toBe(503);
    expect(teamFiles(w.teamId).length).toBe(filesBefore + 1);

    await pdb.restart();
    const after = await stored(w.teamId);
    expect(after).toMatchObject({ sessions: before.sessions, bands: before.bands, results: before.results, jobs: before.jobs, uploadedEvents: before.uploadedEvents });
    const isNew = (u: { id: string }) => !before.uploads.some((b) => b.id === u.id);
    const waitingUpload = after.uploads.filter((u) => u.status === "stored" && isNew(u));
    expect(waitingUpload).toHaveLength(1);

    const retried = await post();
    expect(retried.status).toBe(201);
    const done = await stored(w.teamId);
    expect(done.sessions).toBe(before.sessions + 1);
    expect(done.results).toBe(before.results + 1);
    expect(done.jobs).toBe(before.jobs + 1);
    // The waiting upload became the session's; the retry's own copy of the same bytes was dropped.
    expect(done.uploads.filter((u) => u.status === "stored" && isNew(u))).toEqual([]);
    expect(done.uploads.find((u) => u.id === waitingUpload[0].id)?.status).toBe("attached");
    expect(teamFiles(w.teamId).length).toBe(filesBefore + 1);
    console.log(
      `fault: MariaDB killed mid-ingest (API; waiting at "${waiting}") → 503 during and while down, no session row after restart, ` +
        `the stored file kept as a waiting upload; same request after restart → 201 reusing it, no second file: held`,
    );
  }, 90_000);
});

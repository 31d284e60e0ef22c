// Fault: the app server process restarted under load. A second server of the built app (scripts/serve.mjs,
// the same database and upload folder as the served test app) takes a loop of signed-in page loads, API
// reads and uploads from a few clients while it is killed (SIGKILL: a crash) and started again, then
// stopped with SIGTERM and started again. What must hold (issue 12, item 8): no 5xx once it answers again,
// and none from the SIGTERM drain either (the requests in flight finish); connection errors while it is
// down are expected and counted apart. Every upload answered 201 has its row
// and its file. Runs in the browser-test stage because it needs the build (npm test builds it first).
import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, rmSync } from "node:fs";
import path from "node:path";
import { eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { rawUploads } from "~/db/schema/sessions";
import { createApiToken } from "~/server/api-tokens.server";
import { db, pool } from "~/server/db.server";
import { storage } from "~/server/storage.server";
import { ingestWorld } from "../server/ingest-support";
import { sleep } from "../server/helpers/wait";

const offset = Number(process.env.RAKELINE_TEST_PORT_OFFSET || 0);
// Clear of the served test app (3100+), the S3 fake (3600+), worker health (3700+) and the fault database (3900+).
const PORT = 3800 + offset;
const BASE = `http://127.0.0.1:${PORT}`;
const APP_URL = (process.env.APP_URL ?? "http://127.0.0.1:3100").replace(/\/$/, "");

let w: Awaited<ReturnType<typeof ingestWorld>>;
let token = "";
let server: ChildProcess | null = null;
let serverLog = "";


async function startServer(): Promise<void> {
  const child = spawn(process.execPath, [path.join("scripts", "serve.mjs")], {
    env: { ...process.env, NODE_ENV: "production", HOST: "127.0.0.1", PORT: String(PORT) },
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout!.on("data", (d) => (serverLog += d));
  child.stderr!.on("data", (d) => (serverLog += d));
  server = child;
  const deadline = Date.now() + 30_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`the app server exited (${child.exitCode}):\n${serverLog.slice(-2000)}`);
    try {
      if ((await fetch(`${BASE}/healthz`)).ok) return;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`the app server did not answer within 30 s:\n${serverLog.slice(-2000)}`);
    await sleep(100);
  }
}

async function stopServer(signal: NodeJS.Signals): Promise<void> {
  const child = server;
  if (!child || child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise((r) => child.once("exit", r));
  child.kill(signal);
  await Promise.race([exited, sleep(15_000).then(() => child.kill("SIGKILL"))]);
  await exited;
}

beforeAll(async () => {
  if (!existsSync(path.join("build", "server", "index.js"))) throw new Error("build/ is missing: run this through npm test (it builds the app first)");
  w = await ingestWorld("restart");
  const made = await createApiToken(w.userId, w.slug, "Load loop");
  if (!made.ok) throw new Error("token");
  token = made.token;
  await startServer();
}, 60_000);

afterAll(async () => {
  await stopServer("SIGKILL");
  // The loop's uploads (a few hundred small files) are not kept in the shared test folder.
  if (w) {
    await db.delete(rawUploads).where(eq(rawUploads.teamId, w.teamId)).catch(() => undefined);
    rmSync(path.join((storage().config as { dir: string }).dir, "teams", w.teamId), { recursive: true, force: true });
  }
  await pool.end().catch(() => undefined);
});

type Outcome = { at: number; end: number; kind: "page" | "api" | "upload"; status: number | null; error?: string; uploadId?: string };

/** One request of the loop: a page, the API list, or an upload of a small, unique log. */
async function once(kind: Outcome["kind"], n: number): Promise<Outcome> {
  const at = Date.now();
  const outcome = await attempt(kind, n);
  return { at, end: Date.now(), kind, ...outcome };
}

async function attempt(kind: Outcome["kind"], n: number): Promise<Omit<Outcome, "at" | "end" | "kind">> {
  try {
    if (kind === "page") {
      const res = await fetch(`${BASE}/t/${w.slug}/sessions`, { headers: { cookie: w.jar.header() }, redirect: "manual" });
      await res.arrayBuffer();
      return { status: res.status };
    }
    if (kind === "api") {
      const res = await fetch(`${BASE}/api/sessions?limit=5`, { headers: { authorization: `Bearer ${token}` } });
      await res.arrayBuffer();
      return { status: res.status };
    }
    const rows = Array.from({ length: 2000 }, (_, i) => `${(i / 50).toFixed(2)},${(120 + (i % 40)).toFixed(1)},${(n % 7) * 0.1}`).join("\n");
    const form = new FormData();
    form.set("file", new File([`Time,Speed,Note\n${rows}\n# ${randomBytes(8).toString("hex")}\n`], `loop-${n}.csv`, { type: "text/csv" }));
    const res = await fetch(`${BASE}/api/t/${w.slug}/uploads`, { method: "POST", headers: { cookie: w.jar.header(), origin: APP_URL }, body: form });
    const body = (await res.json().catch(() => null)) as { upload?: { id: string } } | null;
    return { status: res.status, uploadId: body?.upload?.id };
  } catch (error) {
    const cause = (error as { cause?: { code?: string; message?: string } }).cause;
    return { status: null, error: cause?.code ?? cause?.message ?? (error as Error).message };
  }
}

/** Clients looping until `stop` resolves. */
function load(clients: number, stop: Promise<void>): Promise<Outcome[]> {
  const outcomes: Outcome[] = [];
  let running = true;
  void stop.then(() => (running = false));
  let n = 0;
  const kinds: Outcome["kind"][] = ["page", "api", "upload"];
  return Promise.all(
    Array.from({ length: clients }, async (_, c) => {
      while (running) {
        const i = n++;
        const outcome = await once(kinds[(i + c) % kinds.length], i);
        outcomes.push(outcome);
        // A refused connection comes back at once: do not spin.
        if (outcome.status === null) await sleep(50);
      }
    }),
  ).then(() => outcomes);
}

function tally(outcomes: Outcome[]) {
  const by: Record<string, number> = {};
  for (const o of outcomes) {
    const key = o.status === null ? `conn:${o.error}` : String(o.status);
    by[key] = (by[key] ?? 0) + 1;
  }
  return by;
}

describe("fault: the app server restarted under load", () => {
  it("no 5xx once it is back (after a crash and after a SIGTERM restart); connection errors only while it is down; every 201 upload stored", async () => {
    let release!: () => void;
    const stop = new Promise<void>((r) => (release = r));
    const loading = load(4, stop);
    const marks: Record<string, number> = {};

    await sleep(3_000);
    marks.killed = Date.now();
    await stopServer("SIGKILL");
    await sleep(1_000);
    await startServer();
    marks.backAfterKill = Date.now();
    await sleep(3_000);
    marks.terminated = Date.now();
    await stopServer("SIGTERM");
    await startServer();
    marks.backAfterTerm = Date.now();
    await sleep(3_000);
    release();
    const outcomes = await loading;

    // A request in flight when the server goes down counts as "while down"; "back" is from the first answer on.
    const phase = (o: Outcome) =>
      o.end < marks.killed ? "before" : o.at < marks.backAfterKill ? "down1" : o.end < marks.terminated ? "back1" : o.at < marks.backAfterTerm ? "down2" : "back2";
    const of = (name: string) => outcomes.filter((o) => phase(o) === name);
    const [before, down1, back1, down2, back2] = ["before", "down1", "back1", "down2", "back2"].map(of);
    const fiveHundreds = (list: Outcome[]) => list.filter((o) => o.status !== null && o.status >= 500);
    const connectionErrors = (list: Outcome[]) => list.filter((o) => o.status === null);

    // The loop ran in every phase, and succeeded before and after.
    for (const [name, list] of Object.entries({ before, back1, back2 })) {
      expect(list.filter((o) => o.status === 200 || o.status === 201).length, name).toBeGreaterThan(5);
    }
    expect(fiveHundreds(before)).toEqual([]);
    // A crash answers nothing; a SIGTERM finishes what is in flight (the pool stays open for it) and
    // closes kept-alive connections instead of taking more on them.
    expect(fiveHundreds(down1)).toEqual([]);
    expect(fiveHundreds(down2).map((o) => `${o.kind} ${o.status}`)).toEqual([]);
    expect(fiveHundreds(back1)).toEqual([]);
    expect(fiveHundreds(back2)).toEqual([]);
    // Once the server answers, nothing fails to connect.
    expect(connectionErrors(back1)).toEqual([]);
    expect(connectionErrors(back2)).toEqual([]);
    // Every answer is one of the expected ones (pages 200, API 200, uploads 201).
    for (const o of [...before, ...back1, ...back2]) expect([200, 201], `${o.kind} answered ${o.status}`).toContain(o.status);

    // Every upload answered 201 has its row and its file.
    const ids = outcomes.filter((o) => o.status === 201 && o.uploadId).map((o) => o.uploadId!);
    const rows = await db.select().from(rawUploads).where(inArray(rawUploads.id, ids));
    expect(rows).toHaveLength(ids.length);
    const dir = (storage().config as { dir: string }).dir;
    for (const row of rows) expect(existsSync(path.join(dir, row.storageKey)), row.storageKey).toBe(true);

    console.log(
      `fault: app server killed (SIGKILL) and restarted under load (4 clients: pages, API reads, uploads) → ` +
        `before ${JSON.stringify(tally(before))}, while down ${JSON.stringify(tally(down1))}, back ${JSON.stringify(tally(back1))}; ` +
        `SIGTERM restart → while down ${JSON.stringify(tally(down2))}, back ${JSON.stringify(tally(back2))}; ` +
        `0 5xx while going down or after; ${ids.length} uploads answered 201, all stored: held`,
    );
  }, 90_000);
});

// Headless API: POST /api/sessions (Bearer token, multipart file + meta) and GET /api/sessions (issue 11's
// list shape, cursor pagination, filters). The summary answered is held to the engine run directly on the
// same file with the Garage's car file and the same map (what the CLI does).
import { readdirSync, readFileSync, existsSync } from "node:fs";
import path from "node:path";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { jobs } from "~/db/schema/jobs";
import { analysisSessions, rawUploads } from "~/db/schema/sessions";
import { createApiToken } from "~/server/api-tokens.server";
import { db } from "~/server/db.server";
import { storage } from "~/server/storage.server";
import * as sessionsRoute from "~/routes/api/sessions";
import { appUrl, args, outcome } from "./auth-support";
import { browserSummary, ingestWorld, LOGS, mapOf } from "./ingest-support";

let w: Awaited<ReturnType<typeof ingestWorld>>;
let rival: Awaited<ReturnType<typeof ingestWorld>>;
let token = "";
let rivalToken = "";
beforeAll(async () => {
  w = await ingestWorld("api");
  rival = await ingestWorld("rival");
  const made = await createApiToken(w.userId, w.slug, "Pit laptop");
  const madeRival = await createApiToken(rival.userId, rival.slug, "Rival laptop");
  if (!made.ok || !madeRival.ok) throw new Error("token");
  token = made.token;
  rivalToken = madeRival.token;
});

function apiPost(bytes: Uint8Array | null, meta: unknown, auth: string | null = token, fileName = "stint.csv"): Request {
  const form = new FormData();
  if (meta !== undefined) form.set("meta", typeof meta === "string" ? meta : JSON.stringify(meta));
  if (bytes) form.set("file", new File([new Uint8Array(bytes)], fileName, { type: "text/csv" }));
  return new Request(`${appUrl}/api/sessions`, { method: "POST", headers: auth ? { authorization: `Bearer ${auth}` } : {}, body: form });
}
const post = (request: Request) => outcome(() => sessionsRoute.action(args(request)));
const list = (query = "", auth = token) => outcome(() => sessionsRoute.loader(args(new Request(`${appUrl}/api/sessions${query}`, { headers: { authorization: `Bearer ${auth}` } }))));
const sessionsOf = (teamId: string) => db.select().from(analysisSessions).where(eq(analysisSessions.teamId, teamId));
function files(teamId: string): string[] {
  const dir = path.join((storage().config as { dir: string }).dir, "teams", teamId);
  return existsSync(dir) ? readdirSync(dir) : [];
}

const LOG = "marlin-kestrel-comma";
const bytes = readFileSync(`${LOGS}/${LOG}.csv`);

describe("POST /api/sessions", () => {
  let firstId = "";

  it("401 without a token or with a bad one; nothing is read or stored", async () => {
    expect((await post(apiPost(bytes, { car: "Marlin SR2" }, null))).status).toBe(401);
    expect((await post(apiPost(bytes, { car: "Marlin SR2" }, "rkl_not-a-real-token"))).status).toBe(401);
    expect(files(w.teamId)).toEqual([]);
  });

  it("201 {id, url, summary} with the engine's summary of the file; the session waits for the worker's re-check", async () => {
    const res = await post(apiPost(bytes, { car: "Marlin SR2", map: mapOf(LOG), date: "2026-05-16", venue: "Kestrel Bank Raceway", run: "Run 1", driver: w.email }, token, `${LOG}.csv`));
    expect(res.status).toBe(201);
    const body = res.body as { id: string; url: string; summary: Record<string, unknown> };
    expect(body.url).toBe(`${appUrl}/t/${w.slug}/sessions/${body.id}`);
    const { traces: _t, ...expected } = await browserSummary(w.teamId, w.cars["marlin-sr2"], `${LOGS}/${LOG}.csv`, mapOf(LOG));
    expect(body.summary).toEqual(JSON.parse(JSON.stringify(expected)));
    firstId = body.id;
    const [session] = await db.select().from(analysisSessions).where(eq(analysisSessions.id, body.id));
    expect(session).toMatchObject({ source: "api", status: "read", setupId: w.cars["marlin-sr2"].setupId, driverUserId: w.userId, runLabel: "Run 1" });
    expect((await db.select().from(jobs).where(eq(jobs.sessionId, body.id))).map((j) => j.kind)).toEqual(["session_check"]);
    expect((await db.select().from(rawUploads).where(eq(rawUploads.sessionId, body.id))).map((r) => r.status)).toEqual(["attached"]);
  });

  it("the same file again is 200 {id, url, duplicate: true} and keeps no second copy", async () => {
    const before = files(w.teamId).length;
    const res = await post(apiPost(bytes, { car: w.cars["marlin-sr2"].carId, map: mapOf(LOG) }));
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ id: firstId, url: `${appUrl}/t/${w.slug}/sessions/${firstId}`, duplicate: true });
    expect(files(w.teamId)).toHaveLength(before);
  });

  it("another team's car is 404, and nothing is stored", async () => {
    const before = { sessions: (await sessionsOf(w.teamId)).length, files: files(w.teamId).length };
    const other = readFileSync(`${LOGS}/marlin-kestrel-splitter.csv`);
    const res = await post(apiPost(other, { car: rival.cars["marlin-sr2"].carId, map: mapOf("marlin-kestrel-splitter") }));
    expect(res.status).toBe(404);
    // The rival's token cannot reach this team's car by name either: its car of that name is its own.
    expect((await sessionsOf(w.teamId)).length).toBe(before.sessions);
    expect(files(w.teamId)).toHaveLength(before.files);
  });

  it("a file the engine refuses is 422 with the engine's message, and nothing is stored", async () => {
    const waitingRows = () => db.select().from(rawUploads).where(eq(rawUploads.teamId, w.teamId));
    const before = { sessions: (await sessionsOf(w.teamId)).length, files: files(w.teamId).length, rows: (await waitingRows()).length };
    const broken = Buffer.from(readFileSync(`${LOGS}/${LOG}.csv`, "utf8").split("\n").slice(0, 6).join("\n") + "\n");
    const res = await post(apiPost(broken, { car: "Marlin SR2", map: mapOf(LOG) }));
    expect(res.status).toBe(422);
    expect((res.body as { error: string }).error).toMatch(/rows|samples/);
    expect((await sessionsOf(w.teamId)).length).toBe(before.sessions);
    // The upload was recorded while it was analysed, and removed with its file when the engine refused it.
    expect((await waitingRows()).length).toBe(before.rows);
    expect(files(w.teamId)).toHaveLength(before.files);
  });

  it("without map or profile the suggester's map is used when complete, else 422 names the missing channels", async () => {
    const log = "vesper-coldwater-comma";
    const res = await post(apiPost(readFileSync(`${LOGS}/${log}.csv`), { car: w.cars["vesper-gt4r"].carId, date: "2026-05-18" }, token, `${log}.csv`));
    expect(res.status).toBe(201);
    const odd = Buffer.from(["alpha,beta,gamma", ...Array.from({ length: 50 }, (_, i) => `${i},${i * 2},${i * 3}`)].join("\n"));
    const missing = await post(apiPost(odd, { car: "Marlin SR2" }));
    expect(missing.status).toBe(422);
    expect((missing.body as { error: string }).error).toMatch(/could not be found.*time.*speed/);
  });

  it("a missing or malformed meta part is 422 and keeps nothing", async () => {
    const before = files(w.teamId).length;
    expect((await post(apiPost(bytes, undefined))).status).toBe(422);
    const bad = await post(apiPost(bytes, "{not json"));
    expect(bad.status).toBe(422);
    expect((bad.body as { error: string }).error).toMatch(/^meta: /);
    expect((await post(apiPost(bytes, { car: "Marlin SR2", colour: "red" }))).status).toBe(422);
    expect(files(w.teamId)).toHaveLength(before);
  });
});

describe("GET /api/sessions", () => {
  it("lists the team's sessions newest first in issue 11's shape, pages with a cursor and filters", async () => {
    const all = await list();
    expect(all.status).toBe(200);
    const body = all.body as { sessions: Array<Record<string, unknown>>; next: string | null };
    expect(body.sessions.map((s) => s.date)).toEqual(["2026-05-18", "2026-05-16"]);
    expect(Object.keys(body.sessions[1])).toEqual(expect.arrayContaining(["id", "url", "date", "venue", "car", "setup", "driver", "run", "state", "cla_total_m2", "balance_front_pct"]));
    expect(body.sessions[1]).toMatchObject({ venue: { name: "Kestrel Bank Raceway" }, car: { name: "Marlin SR2" }, driver: { userId: w.userId }, run: "Run 1", state: "read" });
    expect(typeof body.sessions[1].cla_total_m2).toBe("number");
    expect(body.next).toBeNull();

    const first = (await list("?limit=1")).body as { sessions: Array<{ id: string }>; next: string };
    expect(first.sessions).toHaveLength(1);
    const second = (await list(`?limit=1&cursor=${first.next}`)).body as { sessions: Array<{ id: string }>; next: string | null };
    expect(second.sessions.map((s) => s.id)).toEqual([body.sessions[1].id]);
    expect(second.next).toBeNull();

    expect(((await list("?car=Marlin%20SR2")).body as { sessions: unknown[] }).sessions).toHaveLength(1);
    expect(((await list("?from=2026-05-17")).body as { sessions: unknown[] }).sessions).toHaveLength(1);
    expect(((await list("?state=checked")).body as { sessions: unknown[] }).sessions).toHaveLength(0);
    expect((await list("?cursor=bogus")).status).toBe(400);
    expect((await list("?from=2026-02-30")).status).toBe(400);
  });

  it("is scoped to the token's team: another team's token sees none of them", async () => {
    const theirs = (await list("", rivalToken)).body as { sessions: unknown[] };
    expect(theirs.sessions).toEqual([]);
  });
});

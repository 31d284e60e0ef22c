// Drop a log, server side: POST /api/t/:teamSlug/uploads and POST /api/t/:teamSlug/sessions with real
// multipart and JSON requests. Checked against: Node's crypto for the SHA-256, the engine's own summary
// of the same file for the stored bands, and the database for what is (and is not) left behind.
import { createHash } from "node:crypto";
import { existsSync, readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { and, eq } from "drizzle-orm";
import { afterEach, beforeAll, describe, expect, it, vi } from "vitest";
import { auditLog } from "~/db/schema/audit";
import { jobs } from "~/db/schema/jobs";
import { analysisSessions, loggerProfiles, rawUploads, sessionBands, sessionResults } from "~/db/schema/sessions";
import { headerSignature } from "~/lib/sessions/logger-profile";
import { db } from "~/server/db.server";
import { storage } from "~/server/storage.server";
import * as uploadsRoute from "~/routes/api/uploads";
import * as sessionsRoute from "~/routes/api/team-sessions";
import * as profilesRoute from "~/routes/api/logger-profiles";
import { appUrl, args, getRequest, outcome } from "./auth-support";
import { browserSummary, ingestWorld, jsonPost, LOGS, mapOf, multipartFileHead, streamedUploadRequest, uploadRequest } from "./ingest-support";

let w: Awaited<ReturnType<typeof ingestWorld>>;
beforeAll(async () => {
  w = await ingestWorld("upload");
});
afterEach(() => {
  vi.restoreAllMocks();
  delete process.env.RAKELINE_UPLOAD_MAX_BYTES;
});

const LOG = "marlin-kestrel-comma";
const logBytes = readFileSync(`${LOGS}/${LOG}.csv`);

async function upload(bytes: Uint8Array, fileName = `${LOG}.csv`, extra: Record<string, string> = {}) {
  return outcome(() => uploadsRoute.action(args(uploadRequest(w.slug, w.jar, fileName, bytes, extra), { teamSlug: w.slug })));
}

async function post(body: unknown) {
  return outcome(() => sessionsRoute.action(args(jsonPost(`/api/t/${w.slug}/sessions`, body, w.jar), { teamSlug: w.slug })));
}

const uploadsOf = () => db.select().from(rawUploads).where(eq(rawUploads.teamId, w.teamId));
const sessionsOf = () => db.select().from(analysisSessions).where(eq(analysisSessions.teamId, w.teamId));
function teamFiles(): string[] {
  const dir = path.join(storage().config.kind === "fs" ? (storage().config as { dir: string }).dir : "", "teams", w.teamId);
  return existsSync(dir) ? readdirSync(dir) : [];
}

describe("upload → session", () => {
  let uploadId = "";
  let sessionId = "";

  it("stores the upload with the SHA-256 of its bytes", async () => {
    const res = await upload(logBytes);
    expect(res.status).toBe(201);
    const body = res.body as { upload: { id: string; fileName: string; bytes: number; sha256: string }; duplicate: null };
    expect(body.upload).toMatchObject({ fileName: `${LOG}.csv`, bytes: logBytes.length, sha256: createHash("sha256").update(logBytes).digest("hex") });
    expect(body.duplicate).toBeNull();
    uploadId = body.upload.id;
    const [row] = await db.select().from(rawUploads).where(eq(rawUploads.id, uploadId));
    expect(row.status).toBe("stored");
    expect(teamFiles()).toHaveLength(1);
  });

  it("stores the session of record in one go: row, bands, result, re-check job, profile, audit", async () => {
    const summary = await browserSummary(w.teamId, w.cars["marlin-sr2"], `${LOGS}/${LOG}.csv`, mapOf(LOG));
    const { traces, ...rest } = summary;
    const res = await post({
      uploadId,
      details: { carId: w.cars["marlin-sr2"].carId, setupId: w.cars["marlin-sr2"].setupId, date: "2026-05-16", venueName: "Kestrel Bank Raceway", run: "Run 2" },
      map: mapOf(LOG),
      profile: { name: "Club logger, comma export" },
      browser: { summary: rest, traces, engineVersion: `summary-v${summary.summary_version}` },
    });
    expect(res.status).toBe(201);
    const answer = res.body as { id: string; url: string };
    expect(answer.url).toBe(`/t/${w.slug}/sessions/${answer.id}`);
    sessionId = answer.id;
    const [session] = await db.select().from(analysisSessions).where(eq(analysisSessions.id, sessionId));
    expect(session).toMatchObject({ status: "read", source: "browser", rawSha256: createHash("sha256").update(logBytes).digest("hex"), sessionDate: "2026-05-16", runLabel: "Run 2", airSource: "isa_sea_level" });
    expect((session.summary as { aero: { cla_total_m2: number } }).aero.cla_total_m2).toBe(summary.aero.cla_total_m2);
    const bands = await db.select().from(sessionBands).where(eq(sessionBands.sessionId, sessionId));
    expect(bands).toHaveLength(summary.bands.length);
    const results = await db.select().from(sessionResults).where(eq(sessionResults.sessionId, sessionId));
    expect(results.map((r) => [r.origin, r.reason])).toEqual([["browser", "upload"]]);
    const queued = await db.select().from(jobs).where(eq(jobs.sessionId, sessionId));
    expect(queued.map((j) => [j.kind, j.status])).toEqual([["session_check", "queued"]]);
    const [raw] = await db.select().from(rawUploads).where(eq(rawUploads.id, uploadId));
    expect([raw.status, raw.sessionId]).toEqual(["attached", sessionId]);
    const events = await db.select().from(auditLog).where(and(eq(auditLog.teamId, w.teamId), eq(auditLog.subjectId, sessionId)));
    expect(events.map((e) => e.action)).toEqual(["session_uploaded"]);

    // The Logger profile is proposed first for a file with the same header.
    const [profile] = await db.select().from(loggerProfiles).where(eq(loggerProfiles.teamId, w.teamId));
    expect(profile.headerSignature).toBe(headerSignature(summary.log.columns));
    const listed = await outcome(() => profilesRoute.loader(args(getRequest(`/api/t/${w.slug}/logger-profiles?signature=${profile.headerSignature}`, w.jar), { teamSlug: w.slug })));
    expect((listed.body as { profiles: Array<{ name: string; matches: boolean; map: unknown }> }).profiles[0]).toMatchObject({ name: "Club logger, comma export", matches: true, map: mapOf(LOG) });
  });

  it("the same file again is recognised: the upload offers the session, and posting it again answers 200 duplicate", async () => {
    const again = await upload(logBytes, "renamed-copy.csv");
    expect(again.status).toBe(201);
    const body = again.body as { upload: { id: string }; duplicate: { id: string; url: string } };
    expect(body.duplicate).toEqual({ id: sessionId, url: `/t/${w.slug}/sessions/${sessionId}` });
    const summary = await browserSummary(w.teamId, w.cars["marlin-sr2"], `${LOGS}/${LOG}.csv`, mapOf(LOG));
    const res = await post({
      uploadId: body.upload.id,
      details: { carId: w.cars["marlin-sr2"].carId, setupId: w.cars["marlin-sr2"].setupId, date: "2026-05-16", venueName: "Kestrel Bank Raceway" },
      map: mapOf(LOG),
      browser: { summary, engineVersion: "summary-v2" },
    });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ id: sessionId, url: `/t/${w.slug}/sessions/${sessionId}`, duplicate: true });
    expect(await sessionsOf()).toHaveLength(1);
  });
});

describe("bad input never loses data and leaves nothing half-done", () => {
  it("refuses a file by its extension (415) and binary content (415), storing nothing", async () => {
    const before = (await uploadsOf()).length;
    const xlsx = await upload(logBytes, "stint.xlsx");
    expect(xlsx.status).toBe(415);
    expect((xlsx.body as { error: string }).error).toContain(".csv, .tsv or .txt");
    const binary = await upload(Buffer.concat([Buffer.from("Time,Speed\n"), Buffer.alloc(2000)]), "zeros.csv");
    expect(binary.status).toBe(415);
    expect((binary.body as { error: string }).error).toMatch(/binary/);
    expect(await uploadsOf()).toHaveLength(before);
  });

  it("refuses a declared oversize upload with 413 before reading its body", async () => {
    process.env.RAKELINE_UPLOAD_MAX_BYTES = "1000";
    let pulled = false;
    const body = new ReadableStream<Uint8Array>({ pull() { pulled = true; throw new Error("the body must not be read"); } }, { highWaterMark: 0 });
    const request = new Request(`${appUrl}/api/t/${w.slug}/uploads`, {
      method: "POST",
      headers: { origin: appUrl, cookie: w.jar.header(), "content-type": "multipart/form-data; boundary=x", "content-length": String(5 * 1024 * 1024) },
      body,
      duplex: "half",
    } as RequestInit);
    const res = await outcome(() => uploadsRoute.action(args(request, { teamSlug: w.slug })));
    expect(res.status).toBe(413);
    expect((res.body as { error: string }).error).toMatch(/limit is 1 KiB/);
    expect(pulled).toBe(false);
  });

  it("refuses a file over the limit while it streams (no Content-Length) and keeps no part of it", async () => {
    process.env.RAKELINE_UPLOAD_MAX_BYTES = String(logBytes.length - 1);
    const before = teamFiles().length;
    const res = await upload(logBytes, "one-byte-too-many.csv");
    expect(res.status).toBe(413);
    expect(teamFiles()).toHaveLength(before);
  });

  it("an upload cut off midway leaves no row and no visible file", async () => {
    const before = { rows: (await uploadsOf()).length, files: teamFiles().length };
    const boundary = "----cut";
    const head = multipartFileHead(boundary, "cut.csv");
    let sent = 0;
    const body = new ReadableStream<Uint8Array>({
      pull(controller) {
        if (sent === 0) controller.enqueue(head);
        if (sent > 400_000) return controller.error(new Error("the client went away"));
        controller.enqueue(new Uint8Array(logBytes.subarray(sent, sent + 100_000)));
        sent += 100_000;
      },
    });
    const request = streamedUploadRequest(w.slug, w.jar, boundary, body);
    const res = await outcome(() => uploadsRoute.action(args(request, { teamSlug: w.slug })));
    expect(res.status).toBe(400);
    expect((res.body as { error: string }).error).toMatch(/interrupted/);
    expect((await uploadsOf()).length).toBe(before.rows);
    expect(teamFiles()).toHaveLength(before.files);
  });

  it("a map the stored file does not fit gets the engine's message (422) and stores no session; the upload waits", async () => {
    const log = "vesper-kestrel-tab";
    const up = await upload(readFileSync(`${LOGS}/${log}.csv`), `${log}.csv`);
    const uploadId = (up.body as { upload: { id: string } }).upload.id;
    const summary = await browserSummary(w.teamId, w.cars["vesper-gt4r"], `${LOGS}/${log}.csv`, mapOf(log));
    const badMap = { ...mapOf(log), speed: { column: "Speed Over Ground", unit: "km/h" } };
    const before = (await sessionsOf()).length;
    const res = await post({
      uploadId,
      details: { carId: w.cars["vesper-gt4r"].carId, setupId: w.cars["vesper-gt4r"].setupId, date: "2026-05-17", venueName: "Kestrel Bank Raceway" },
      map: badMap,
      browser: { summary, engineVersion: "summary-v2" },
    });
    expect(res.status).toBe(422);
    expect((res.body as { error: string; fields: Record<string, string> }).fields.map).toContain('column "Speed Over Ground" mapped to speed is not in the file');
    expect((await sessionsOf()).length).toBe(before);
    const [row] = await db.select().from(rawUploads).where(eq(rawUploads.id, uploadId));
    expect(row.status).toBe("stored");
  });

  it("a text file that is no log is refused by the engine with its message, and nothing is stored", async () => {
    const up = await upload(Buffer.from("Shopping list\nbrake pads\nfuel cans\n"), "notes.txt");
    const uploadId = (up.body as { upload: { id: string } }).upload.id;
    const before = (await sessionsOf()).length;
    const res = await post({
      uploadId,
      details: { carId: w.cars["marlin-sr2"].carId, setupId: w.cars["marlin-sr2"].setupId, date: "2026-05-17", venueName: "Kestrel Bank Raceway" },
      map: mapOf(LOG),
      browser: { summary: { summary_version: 2, samples: 0, duration_s: 0, aero: {}, bands: [], warnings: [] }, engineVersion: "summary-v2" },
    });
    expect(res.status).toBe(422);
    expect((res.body as { error: string }).error).toMatch(/^(The stored file cannot be read|Channel map): /);
    expect((await sessionsOf()).length).toBe(before);
  });

  it("session details are checked on the server with the form's messages (422 with fields)", async () => {
    const res = await post({ uploadId: "x", details: { carId: "", date: "2026-02-30" }, map: {}, browser: { summary: {}, engineVersion: "v" } });
    expect(res.status).toBe(422);
    expect((res.body as { fields: Record<string, string> }).fields).toMatchObject({ carId: "Choose a car.", setupId: "Choose a setup version.", date: "Date is not a day of the calendar." });
  });

  it("the database going away after the file is stored answers 503 and removes the file", async () => {
    const before = teamFiles().length;
    const down = Object.assign(new Error("connect ECONNREFUSED 127.0.0.1:3308"), { code: "ECONNREFUSED" });
    vi.spyOn(db, "insert").mockImplementation(() => {
      throw down;
    });
    const res = await upload(Buffer.concat([logBytes, Buffer.from("\n")]), "db-down.csv");
    expect(res.status).toBe(503);
    expect((res.body as { error: string }).error).toMatch(/database is not answering/);
    expect(teamFiles()).toHaveLength(before);
  });

  it("another team's member cannot upload to this team (404)", async () => {
    const other = await ingestWorld("other");
    const res = await outcome(() => uploadsRoute.action(args(uploadRequest(w.slug, other.jar, "x.csv", logBytes), { teamSlug: w.slug })));
    expect(res.status).toBe(404);
  });
});

describe("uploads that never become a session", () => {
  it("are removed after a day, row and file; newer ones and attached ones stay", async () => {
    const { sweepStaleUploads } = await import("~/server/ingest/raw-uploads.server");
    const old = await upload(Buffer.concat([logBytes, Buffer.from("\n\n")]), "forgotten.csv");
    const fresh = await upload(Buffer.concat([logBytes, Buffer.from("\n\n\n")]), "fresh.csv");
    const oldId = (old.body as { upload: { id: string } }).upload.id;
    const freshId = (fresh.body as { upload: { id: string } }).upload.id;
    const [row] = await db.select().from(rawUploads).where(eq(rawUploads.id, oldId));
    await db.update(rawUploads).set({ createdAt: new Date(Date.now() - 25 * 3600_000) }).where(eq(rawUploads.id, oldId));
    const before = teamFiles().length;
    expect(await sweepStaleUploads(24)).toBeGreaterThanOrEqual(1);
    expect(await db.select().from(rawUploads).where(eq(rawUploads.id, oldId))).toEqual([]);
    expect((await db.select().from(rawUploads).where(eq(rawUploads.id, freshId))).length).toBe(1);
    expect(teamFiles()).toHaveLength(before - 1);
    expect(teamFiles()).not.toContain(row.storageKey.split("/").pop());
  });
});

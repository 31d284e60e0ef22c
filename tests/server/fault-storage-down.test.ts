// Fault: the upload store goes away. The app stores raw files in an S3-compatible store (s3rver, a local
// fake, started here on a port of this file's own) which is shut down while a Drop a log upload streams
// in, and which is not there at all for the next one. What must hold (issue 10, item 9; issue 12, item 8):
// a clear 503 saying the file store is not answering (RFC 9110 section 15.6.4: 503 is a temporary
// condition), not a 400 blaming the upload; no upload row and no object left; the same upload works once
// the store is back.
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { ListObjectsV2Command, S3Client } from "@aws-sdk/client-s3";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";

const offset = Number(process.env.RAKELINE_TEST_PORT_OFFSET || 0);
// Clear of the shared S3 fake (3600+), worker health (3700+), the restart test's server (3800+) and the fault database (3900+).
const PORT = 3990 + offset;
const BUCKET = "rakeline-fault";
const dir = mkdtempSync(path.join(os.tmpdir(), "rakeline-s3-down-"));
// This file's processes store raw files in that bucket (the storage module reads these on first use);
// the variables are put back after the file.
const S3_ENV = ["S3_BUCKET", "S3_ENDPOINT", "S3_REGION", "S3_ACCESS_KEY_ID", "S3_SECRET_ACCESS_KEY", "S3_FORCE_PATH_STYLE"];
const outerEnv = Object.fromEntries(S3_ENV.map((k) => [k, process.env[k]]));
Object.assign(process.env, {
  S3_BUCKET: BUCKET,
  S3_ENDPOINT: `http://127.0.0.1:${PORT}`,
  S3_REGION: "us-east-1",
  // s3rver's fixed development credentials.
  S3_ACCESS_KEY_ID: "S3RVER",
  S3_SECRET_ACCESS_KEY: "S3RVER",
  S3_FORCE_PATH_STYLE: "on",
});

const { db, pool } = await import("~/server/db.server");
const { rawUploads } = await import("~/db/schema/sessions");
const { storage } = await import("~/server/storage.server");
const uploadsRoute = await import("~/routes/api/uploads");
const { args, outcome } = await import("./auth-support");
const { ingestWorld, LOGS, multipartFileHead, multipartTail, streamedUploadRequest, uploadRequest } = await import("./ingest-support");
type Fake = { run(): Promise<unknown>; close(): Promise<void> };
// s3rver ships no type declarations: its constructor and the two methods used here.
const s3rverModule: string = "s3rver";
const { default: S3rver } = (await import(s3rverModule)) as { default: new (options: object) => Fake };
let fake: Fake | null = null;
async function startFake() {
  fake = new S3rver({ address: "127.0.0.1", port: PORT, directory: dir, silent: true, configureBuckets: [{ name: BUCKET }] });
  await fake.run();
}

let w: Awaited<ReturnType<typeof ingestWorld>>;
beforeAll(async () => {
  await startFake();
  w = await ingestWorld("s3down");
});
afterAll(async () => {
  for (const [k, v] of Object.entries(outerEnv)) {
    if (v === undefined) delete process.env[k];
    else process.env[k] = v;
  }
  // The S3 store made for this file is not kept for anything after it.
  delete (globalThis as { __rakelineStorage?: unknown }).__rakelineStorage;
  await fake?.close().catch(() => undefined);
  rmSync(dir, { recursive: true, force: true });
  await pool.end().catch(() => undefined);
});

const client = new S3Client({ region: "us-east-1", endpoint: `http://127.0.0.1:${PORT}`, forcePathStyle: true, credentials: { accessKeyId: "S3RVER", secretAccessKey: "S3RVER" } });
const objects = async () => ((await client.send(new ListObjectsV2Command({ Bucket: BUCKET, Prefix: `teams/${w.teamId}/` }))).Contents ?? []).map((o) => o.Key);
const rows = async () => (await db.select().from(rawUploads).where(eq(rawUploads.teamId, w.teamId))).length;

const LOG = "marlin-kestrel-comma";
const bytes = readFileSync(`${LOGS}/${LOG}.csv`);

describe("fault: the upload store stops answering", () => {
  it("shut down mid-upload, and down for the next one: 503 saying so, no row or object; works once it is back", async () => {
    expect(storage().kind).toBe("s3");
    // A client sending the file in two halves: the store is shut down between them.
    const boundary = "----s3down";
    let controller!: ReadableStreamDefaultController<Uint8Array>;
    const body = new ReadableStream<Uint8Array>({ start: (c) => void (controller = c) });
    controller.enqueue(multipartFileHead(boundary, `${LOG}.csv`));
    controller.enqueue(new Uint8Array(bytes.subarray(0, bytes.length >> 1)));
    const request = streamedUploadRequest(w.slug, w.jar, boundary, body);
    const pending = outcome(() => uploadsRoute.action(args(request, { teamSlug: w.slug }) as never));
    await new Promise((r) => setTimeout(r, 300));
    await fake!.close();
    controller.enqueue(new Uint8Array(bytes.subarray(bytes.length >> 1)));
    controller.enqueue(multipartTail(boundary));
    controller.close();
    const during = await pending;
    expect(during.status).toBe(503);
    expect((during.body as { error: string }).error).toMatch(/file store is not answering, so the file was not stored/);

    // Down from the start.
    const down = await outcome(() => uploadsRoute.action(args(uploadRequest(w.slug, w.jar, `${LOG}.csv`, bytes), { teamSlug: w.slug }) as never));
    expect(down.status).toBe(503);
    expect((down.body as { error: string }).error).toMatch(/file store is not answering/);
    expect(await rows()).toBe(0);

    await startFake();
    expect(await objects()).toEqual([]);
    const back = await outcome(() => uploadsRoute.action(args(uploadRequest(w.slug, w.jar, `${LOG}.csv`, bytes), { teamSlug: w.slug }) as never));
    expect(back.status).toBe(201);
    expect(await rows()).toBe(1);
    expect(await objects()).toHaveLength(1);
    console.log(`fault: S3 store shut down mid-upload → 503 "${(during.body as { error: string }).error.slice(0, 58)}…"; down for the next upload → 503; 0 rows, 0 objects; store back → 201: held`);
  }, 60_000);
});

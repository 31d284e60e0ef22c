// Raw file storage (app/server/storage.server.ts) on disk and against s3rver, the S3-compatible fake
// `npm test` starts (S3_TEST_*). Checks: the SHA-256 taken while streaming equals Node's crypto over the
// whole file; a file is read back byte for byte; a file over the cap, a refused head or a source cut
// off midway leaves nothing visible.
import { createHash } from "node:crypto";
import { mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { ListObjectsV2Command, S3Client } from "@aws-sdk/client-s3";
import { afterAll, describe, expect, it } from "vitest";
import { createStorage, StorageLimitError, type Storage, type StorageConfig } from "~/server/storage.server";

const LOG = "sample-data/logs/marlin-kestrel-comma.csv";
const logBytes = readFileSync(LOG);
const logSha = createHash("sha256").update(logBytes).digest("hex");

const fsDir = mkdtempSync(path.join(tmpdir(), "rakeline-storage-"));
afterAll(() => rmSync(fsDir, { recursive: true, force: true }));

const s3Config: StorageConfig | null = process.env.S3_TEST_ENDPOINT
  ? {
      kind: "s3",
      bucket: process.env.S3_TEST_BUCKET!,
      endpoint: process.env.S3_TEST_ENDPOINT,
      region: process.env.S3_TEST_REGION ?? "us-east-1",
      accessKeyId: process.env.S3_TEST_ACCESS_KEY_ID,
      secretAccessKey: process.env.S3_TEST_SECRET_ACCESS_KEY,
      forcePathStyle: true,
      spoolDir: fsDir,
    }
  : null;

async function readAll(stream: Readable): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) chunks.push(Buffer.from(chunk));
  return Buffer.concat(chunks);
}

/** The file in small chunks, then (optionally) a failure: a client that went away midway. */
async function* chunked(bytes: Buffer, size: number, failAfter?: number) {
  for (let at = 0; at < bytes.length; at += size) {
    if (failAfter !== undefined && at >= failAfter) throw new Error("connection reset by the client");
    yield bytes.subarray(at, at + size);
  }
}

const noBinary = (head: Buffer) => (head.includes(0) ? "This file holds binary data, not text." : null);

async function visibleKeys(store: Storage, prefix: string): Promise<string[]> {
  if (store.config.kind === "fs") {
    const dir = path.join(store.config.dir, prefix);
    let names: string[] = [];
    try {
      names = readdirSync(dir);
    } catch {
      names = [];
    }
    return names;
  }
  const client = new S3Client({ region: store.config.region, endpoint: store.config.endpoint, forcePathStyle: true, credentials: { accessKeyId: store.config.accessKeyId!, secretAccessKey: store.config.secretAccessKey! } });
  const listed = await client.send(new ListObjectsV2Command({ Bucket: store.config.bucket, Prefix: `${prefix}/` }));
  return (listed.Contents ?? []).map((o) => o.Key!);
}

const backends: Array<[string, StorageConfig | null]> = [
  ["filesystem", { kind: "fs", dir: fsDir }],
  ["S3 (s3rver)", s3Config],
];

describe.each(backends)("storage on %s", (_name, config) => {
  // `npm test` always starts the fake; a bare `vitest run` without it must say so, not pass quietly.
  it("is configured", () => {
    expect(config, "S3_TEST_ENDPOINT is not set: run this file through `npm test -- tests/server/storage.test.ts`").not.toBeNull();
  });
  if (!config) return;
  const store = createStorage(config);

  it("stores a log streamed in chunks with its SHA-256 and size, reads it back and deletes it", async () => {
    const put = await store.putStream(chunked(logBytes, 7001), { keyPrefix: "teams/t-ok", maxBytes: logBytes.length, checkHead: noBinary });
    expect(put).toMatchObject({ storage: config.kind, bytes: logBytes.length, sha256: logSha });
    expect(put.key.startsWith("teams/t-ok/")).toBe(true);
    expect((await readAll(await store.getStream(put.storage, put.key))).equals(logBytes)).toBe(true);
    const viaLocal = await store.withLocalFile(put.storage, put.key, async (file) => createHash("sha256").update(readFileSync(file)).digest("hex"));
    expect(viaLocal).toBe(logSha);
    await store.deleteObject(put.storage, put.key);
    expect(await visibleKeys(store, "teams/t-ok")).toEqual([]);
    await expect(store.getStream(put.storage, put.key)).rejects.toThrow();
  });

  it("refuses a file one byte over the cap with 413 and keeps nothing", async () => {
    const refused = await store.putStream(chunked(logBytes, 65536), { keyPrefix: "teams/t-big", maxBytes: logBytes.length - 1 }).catch((e) => e);
    expect(refused).toBeInstanceOf(StorageLimitError);
    expect(refused.status).toBe(413);
    expect(await visibleKeys(store, "teams/t-big")).toEqual([]);
  });

  it("refuses a file whose head fails the check with 415 and keeps nothing", async () => {
    const binary = Buffer.concat([Buffer.from("PK\u0003\u0004"), Buffer.alloc(100_000)]);
    const refused = await store.putStream(chunked(binary, 4096), { keyPrefix: "teams/t-bin", checkHead: noBinary }).catch((e) => e);
    expect(refused).toBeInstanceOf(StorageLimitError);
    expect(refused.status).toBe(415);
    expect(await visibleKeys(store, "teams/t-bin")).toEqual([]);
  });

  it("a source cut off midway fails the store and leaves no partial file visible", async () => {
    const cut = await store.putStream(chunked(logBytes, 65536, Math.floor(logBytes.length / 2)), { keyPrefix: "teams/t-cut" }).catch((e) => e);
    expect(cut).toBeInstanceOf(Error);
    expect(String(cut.message)).toContain("connection reset");
    expect(await visibleKeys(store, "teams/t-cut")).toEqual([]);
    if (config.kind === "fs") expect(readdirSync(path.join(fsDir, ".partial"))).toEqual([]);
  });

  it("stores a web ReadableStream (a request body) the same way", async () => {
    const put = await store.putStream(Readable.toWeb(Readable.from(chunked(logBytes, 100_000))) as ReadableStream<Uint8Array>, { keyPrefix: "teams/t-web" });
    expect(put.sha256).toBe(logSha);
    await store.deleteObject(put.storage, put.key);
  });
});

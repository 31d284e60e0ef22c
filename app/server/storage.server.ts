/**
 * Raw log files: the local filesystem under UPLOAD_DIR (default .data/uploads), or any S3-compatible
 * store when S3_BUCKET is set (with S3_ENDPOINT, S3_REGION, S3_ACCESS_KEY_ID, S3_SECRET_ACCESS_KEY and
 * S3_FORCE_PATH_STYLE=on for a local fake). Files are streamed, never held in memory, and hashed
 * (SHA-256) while they stream. A file becomes visible only when complete: on disk it is written under
 * a temporary name and renamed; in S3 a multipart upload is completed (an aborted one leaves nothing).
 *
 *   putStream(source, { keyPrefix, maxBytes, checkHead })  → { storage, key, bytes, sha256 }
 *   getStream(storage, key)                                → a readable stream of the file
 *   deleteObject(storage, key)                             → removes it (missing is fine)
 *   withLocalFile(storage, key, fn)                        → fn(path) on a local copy (S3 is spooled to UPLOAD_DIR)
 *   sweepLeftovers({ partialOlderThanMs, spoolOlderThanMs }) → removes what a killed process left half-written
 */
import { createHash, randomUUID } from "node:crypto";
import { createReadStream, createWriteStream } from "node:fs";
import { mkdir, readdir, rename, rm, stat } from "node:fs/promises";
import path from "node:path";
import { PassThrough, Readable, Transform, type TransformCallback } from "node:stream";
import { pipeline } from "node:stream/promises";
import { DeleteObjectCommand, GetObjectCommand, HeadBucketCommand, S3Client } from "@aws-sdk/client-s3";
import { Upload } from "@aws-sdk/lib-storage";

export type StorageKind = "fs" | "s3";
export type StoredObject = { storage: StorageKind; key: string; bytes: number; sha256: string };

export type StorageConfig =
  | { kind: "fs"; dir: string }
  | { kind: "s3"; bucket: string; endpoint?: string; region: string; accessKeyId?: string; secretAccessKey?: string; forcePathStyle: boolean; spoolDir: string };

/** Refusals while a file streams in; the upload route turns them into 413 / 415. */
export class StorageLimitError extends Error {
  constructor(
    readonly status: 413 | 415,
    message: string,
  ) {
    super(message);
    this.name = "StorageLimitError";
  }
}

/**
 * The store has no room for the file (disk full, quota, or a file-size limit): the upload route answers
 * 507 Insufficient Storage (RFC 4918, section 11.5) with this sentence. Nothing of the file is kept.
 */
export class StorageFullError extends Error {
  readonly status = 507;
  constructor(readonly code: string) {
    super("The server's file store is full, so the file was not stored and nothing of it was kept. Tell whoever runs this Rakeline server to make room, then send the file again.");
    this.name = "StorageFullError";
  }
}

/** ENOSPC (no space), EDQUOT (quota), EFBIG (file-size limit, e.g. RLIMIT_FSIZE) anywhere in the error's causes. */
export function storageFullCode(error: unknown): string | null {
  let e = error as { code?: unknown; cause?: unknown } | undefined;
  for (let depth = 0; e && depth < 5; depth++) {
    if (typeof e.code === "string" && ["ENOSPC", "EDQUOT", "EFBIG"].includes(e.code)) return e.code;
    e = e.cause as typeof e;
  }
  return null;
}

/**
 * The store does not answer (an S3-compatible store unreachable or failing with 5xx, a disk that errors):
 * the upload route answers 503 with this sentence. Nothing of the file is kept.
 */
export class StorageUnavailableError extends Error {
  readonly status = 503;
  constructor(readonly detail: string) {
    super("The server's file store is not answering, so the file was not stored and nothing of it was kept. Send it again in a minute.");
    this.name = "StorageUnavailableError";
  }
}

const UNREACHABLE = new Set(["ECONNREFUSED", "ECONNRESET", "ETIMEDOUT", "EHOSTUNREACH", "ENETUNREACH", "ENOTFOUND", "EAI_AGAIN", "EPIPE", "EIO", "EROFS"]);

/** A network failure or a 5xx from the store (the AWS SDK puts the HTTP status in $metadata), or a disk I/O error. */
export function storeUnavailableDetail(error: unknown): string | null {
  let e = error as { code?: unknown; cause?: unknown; message?: unknown; $metadata?: { httpStatusCode?: number } } | undefined;
  for (let depth = 0; e && depth < 5; depth++) {
    if (typeof e.code === "string" && UNREACHABLE.has(e.code)) return e.code;
    const status = e.$metadata?.httpStatusCode;
    if (typeof status === "number" && status >= 500) return `HTTP ${status}`;
    e = e.cause as typeof e;
  }
  return null;
}

export function storageConfigFrom(source: Record<string, string | undefined>): StorageConfig {
  const dir = path.resolve(source.UPLOAD_DIR || ".data/uploads");
  if (!source.S3_BUCKET) return { kind: "fs", dir };
  return {
    kind: "s3",
    bucket: source.S3_BUCKET,
    endpoint: source.S3_ENDPOINT || undefined,
    region: source.S3_REGION || "us-east-1",
    accessKeyId: source.S3_ACCESS_KEY_ID || undefined,
    secretAccessKey: source.S3_SECRET_ACCESS_KEY || undefined,
    forcePathStyle: ["on", "true", "1"].includes((source.S3_FORCE_PATH_STYLE ?? "").toLowerCase()),
    spoolDir: dir,
  };
}

const clients = new Map<string, S3Client>();
function s3Client(config: Extract<StorageConfig, { kind: "s3" }>): S3Client {
  const id = JSON.stringify([config.endpoint, config.region, config.accessKeyId, config.forcePathStyle]);
  let client = clients.get(id);
  if (!client) {
    client = new S3Client({
      region: config.region,
      endpoint: config.endpoint,
      forcePathStyle: config.forcePathStyle,
      credentials: config.accessKeyId && config.secretAccessKey ? { accessKeyId: config.accessKeyId, secretAccessKey: config.secretAccessKey } : undefined,
    });
    clients.set(id, client);
  }
  return client;
}

/** Keys are ours (a prefix of ids and a random name): never a user's file name. */
const KEY = /^[A-Za-z0-9][A-Za-z0-9/_-]{0,250}$/;
function checkKey(key: string): string {
  if (!KEY.test(key) || key.includes("..") || key.includes("//")) throw new Error(`storage: bad object key "${key}"`);
  return key;
}

export type PutOptions = {
  /** e.g. "teams/<teamId>"; the object's name is a random id under it. */
  keyPrefix: string;
  /** Bytes allowed; one more and the store is abandoned with a 413 refusal. */
  maxBytes?: number;
  /** Looks at the first bytes (up to 64 KiB, or all of a smaller file); a returned message refuses the file (415). */
  checkHead?: (head: Buffer) => string | null;
};

const HEAD_BYTES = 64 * 1024;

/** Counts, hashes, caps and checks the head of the bytes passing through. */
class Guard extends Transform {
  bytes = 0;
  private readonly hash = createHash("sha256");
  private head: Buffer[] = [];
  private headBytes = 0;
  private checked = false;
  constructor(private readonly options: PutOptions) {
    super();
  }
  digest(): string {
    return this.hash.digest("hex");
  }
  private check(): Error | null {
    this.checked = true;
    const problem = this.options.checkHead?.(Buffer.concat(this.head));
    this.head = [];
    return problem ? new StorageLimitError(415, problem) : null;
  }
  override _transform(chunk: Buffer, _enc: BufferEncoding, done: TransformCallback): void {
    this.bytes += chunk.length;
    if (this.options.maxBytes !== undefined && this.bytes > this.options.maxBytes) {
      done(new StorageLimitError(413, `The file is larger than the limit of ${formatBytes(this.options.maxBytes)}.`));
      return;
    }
    if (!this.checked) {
      this.head.push(chunk);
      this.headBytes += chunk.length;
      if (this.headBytes >= HEAD_BYTES) {
        const refused = this.check();
        if (refused) return done(refused);
      }
    }
    this.hash.update(chunk);
    done(null, chunk);
  }
  override _flush(done: TransformCallback): void {
    done(this.checked ? null : this.check());
  }
}

export function formatBytes(bytes: number): string {
  if (bytes >= 1024 ** 3) return `${+(bytes / 1024 ** 3).toFixed(2)} GiB`;
  if (bytes >= 1024 ** 2) return `${+(bytes / 1024 ** 2).toFixed(1)} MiB`;
  return `${Math.ceil(bytes / 1024)} KiB`;
}

function toReadable(source: Readable | AsyncIterable<Uint8Array> | ReadableStream<Uint8Array>): Readable {
  if (source instanceof Readable) return source;
  if (typeof (source as ReadableStream).getReader === "function") return Readable.fromWeb(source as import("node:stream/web").ReadableStream<Uint8Array>);
  return Readable.from(source as AsyncIterable<Uint8Array>);
}

export function createStorage(config: StorageConfig) {
  async function putStream(source: Readable | AsyncIterable<Uint8Array> | ReadableStream<Uint8Array>, options: PutOptions): Promise<StoredObject> {
    const key = checkKey(`${options.keyPrefix.replace(/\/+$/, "")}/${randomUUID()}`);
    const guard = new Guard(options);
    const input = toReadable(source);
    if (config.kind === "fs") {
      const final = path.join(config.dir, key);
      const tmpDir = path.join(config.dir, ".partial");
      const tmp = path.join(tmpDir, `${randomUUID()}.part`);
      await mkdir(tmpDir, { recursive: true });
      try {
        await pipeline(input, guard, createWriteStream(tmp, { flags: "wx" }));
        await mkdir(path.dirname(final), { recursive: true });
        await rename(tmp, final);
      } catch (error) {
        await rm(tmp, { force: true });
        const full = storageFullCode(error);
        if (full) throw new StorageFullError(full);
        // The disk's own failure (EIO, a read-only file system), not the source's.
        const down = (error as { syscall?: string }).syscall && ["EIO", "EROFS"].includes(String((error as { code?: string }).code)) ? String((error as { code?: string }).code) : null;
        throw down ? new StorageUnavailableError(down) : error;
      }
      return { storage: "fs", key, bytes: guard.bytes, sha256: guard.digest() };
    }
    const body = new PassThrough();
    const upload = new Upload({
      client: s3Client(config),
      params: { Bucket: config.bucket, Key: key, Body: body, ContentType: "text/plain" },
      queueSize: 2,
      partSize: 8 * 1024 * 1024,
      leavePartsOnError: false,
    });
    const feeding = pipeline(input, guard, body);
    const [fed, stored] = await Promise.allSettled([feeding, upload.done().finally(() => body.destroy())]);
    if (fed.status === "rejected" || stored.status === "rejected") {
      await upload.abort().catch(() => undefined);
      // A small file may have been stored in one PUT before the source failed: remove it.
      await deleteObject("s3", key).catch(() => undefined);
      // The source's problem (cut off, too large, refused) says more than the store's reaction to it,
      // unless the store itself went away (then the source was only cut off by that).
      const storeDown = stored.status === "rejected" ? storeUnavailableDetail(stored.reason) : null;
      if (storeDown && !(fed.status === "rejected" && fed.reason instanceof StorageLimitError)) throw new StorageUnavailableError(storeDown);
      throw fed.status === "rejected" ? fed.reason : (stored as PromiseRejectedResult).reason;
    }
    return { storage: "s3", key, bytes: guard.bytes, sha256: guard.digest() };
  }

  async function getStream(storage: StorageKind, key: string): Promise<Readable> {
    checkKey(key);
    if (storage !== config.kind) throw new Error(`storage: this process stores raw files in ${config.kind}, not ${storage}`);
    if (config.kind === "fs") {
      const stream = createReadStream(path.join(config.dir, key), { highWaterMark: 1 << 20 });
      // Fail here (not on the first read) when the file is missing.
      await new Promise<void>((resolve, reject) => {
        stream.once("open", () => resolve());
        stream.once("error", reject);
      });
      return stream;
    }
    const answer = await s3Client(config).send(new GetObjectCommand({ Bucket: config.bucket, Key: key }));
    return answer.Body as Readable;
  }

  async function deleteObject(storage: StorageKind, key: string): Promise<void> {
    checkKey(key);
    if (storage !== config.kind) throw new Error(`storage: this process stores raw files in ${config.kind}, not ${storage}`);
    if (config.kind === "fs") {
      await rm(path.join(config.dir, key), { force: true });
      return;
    }
    await s3Client(config).send(new DeleteObjectCommand({ Bucket: config.bucket, Key: key }));
  }

  /** Runs fn with a path on local disk (the engine's threads read files at offsets); S3 objects are copied to the spool first. */
  async function withLocalFile<T>(storage: StorageKind, key: string, fn: (filePath: string) => Promise<T>): Promise<T> {
    checkKey(key);
    if (config.kind === "fs" && storage === "fs") return fn(path.join(config.dir, key));
    const spoolDir = path.join(config.kind === "s3" ? config.spoolDir : config.dir, ".spool");
    await mkdir(spoolDir, { recursive: true });
    const local = path.join(spoolDir, `${randomUUID()}.csv`);
    try {
      await pipeline(await getStream(storage, key), createWriteStream(local, { flags: "wx" }));
      return await fn(local);
    } finally {
      await rm(local, { force: true });
    }
  }

  /**
   * A process killed while a file streamed in leaves its `.partial/*.part` (never visible as an object,
   * but it fills the disk); one killed while analysing an S3 object leaves its `.spool/*.csv`. Both are
   * removed here once they have not been written for the given time (a live upload writes its part
   * file continually; a spool copy is written once, then read while its job holds the lease). Returns
   * the names removed, per folder.
   */
  async function sweepLeftovers(ages: { partialOlderThanMs: number; spoolOlderThanMs: number }): Promise<{ partial: string[]; spool: string[] }> {
    const base = config.kind === "s3" ? config.spoolDir : config.dir;
    const sweep = async (folder: string, olderThanMs: number) => {
      const dir = path.join(base, folder);
      let names: string[];
      try {
        names = await readdir(dir);
      } catch (error) {
        if ((error as NodeJS.ErrnoException).code === "ENOENT") return [];
        throw error;
      }
      const cutoff = Date.now() - olderThanMs;
      const gone: string[] = [];
      for (const name of names) {
        const file = path.join(dir, name);
        try {
          const info = await stat(file);
          if (!info.isFile() || info.mtimeMs > cutoff) continue;
          await rm(file, { force: true });
          gone.push(name);
        } catch (error) {
          // Renamed into place or removed by its own process meanwhile: nothing left to sweep.
          if ((error as NodeJS.ErrnoException).code !== "ENOENT") throw error;
        }
      }
      return gone;
    };
    return { partial: await sweep(".partial", ages.partialOlderThanMs), spool: await sweep(".spool", ages.spoolOlderThanMs) };
  }

  /** For /readyz: the bucket answers (S3), or the folder can be made (fs). */
  async function ready(): Promise<void> {
    if (config.kind === "fs") {
      await mkdir(config.dir, { recursive: true });
      return;
    }
    await s3Client(config).send(new HeadBucketCommand({ Bucket: config.bucket }));
  }

  return { kind: config.kind, config, putStream, getStream, deleteObject, withLocalFile, sweepLeftovers, ready };
}

export type Storage = ReturnType<typeof createStorage>;

const globalForStorage = globalThis as unknown as { __rakelineStorage?: Storage };
/** This process's store, from its environment. */
export function storage(): Storage {
  return (globalForStorage.__rakelineStorage ??= createStorage(storageConfigFrom(process.env)));
}

export const putStream: Storage["putStream"] = (...a) => storage().putStream(...a);
export const getStream: Storage["getStream"] = (...a) => storage().getStream(...a);
export const deleteObject: Storage["deleteObject"] = (...a) => storage().deleteObject(...a);
export const withLocalFile: Storage["withLocalFile"] = (...a) => storage().withLocalFile(...a);

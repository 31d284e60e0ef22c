/**
 * Receiving a raw log file from a multipart request (the Drop a log page's Uppy upload, the headless
 * API): the file part is streamed through busboy into storage, capped and hashed on the way; small
 * text parts (the API's `meta`) are kept. Nothing is buffered whole. A refused or interrupted upload
 * leaves no file behind.
 */
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import busboy from "busboy";
import { formatBytes, putStream, deleteObject, StorageFullError, StorageLimitError, StorageUnavailableError, type StoredObject } from "../storage.server";
import { extensionProblem, textProblem } from "./text-check.server";

/** RAKELINE_UPLOAD_MAX_BYTES, default 2 GiB. */
export function uploadMaxBytes(): number {
  const n = Number(process.env.RAKELINE_UPLOAD_MAX_BYTES);
  return Number.isFinite(n) && n > 0 ? Math.floor(n) : 2 * 1024 ** 3;
}

/** Room for the multipart framing and a `meta` part beside the file. */
const FORM_OVERHEAD_BYTES = 1024 * 1024;
const MAX_FIELD_BYTES = 256 * 1024;

export class UploadRefusal extends Error {
  constructor(
    readonly status: 400 | 413 | 415 | 503 | 507,
    message: string,
  ) {
    super(message);
    this.name = "UploadRefusal";
  }
}

/** 413 from Content-Length before a byte of the body is read. */
export function refuseDeclaredOversize(request: Request, maxBytes = uploadMaxBytes()): void {
  const declared = Number(request.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > maxBytes + FORM_OVERHEAD_BYTES) {
    throw new UploadRefusal(413, `The upload is ${formatBytes(declared)}; the limit is ${formatBytes(maxBytes)} per file. Nothing was stored.`);
  }
}

export type ReceivedUpload = { file: StoredObject & { fileName: string }; fields: Record<string, string> };

/**
 * Streams the request's `file` part to storage under `keyPrefix`. Throws UploadRefusal (400/413/415)
 * for a request that is not a fitting upload; any stored object is removed again before throwing.
 */
export async function receiveUpload(request: Request, keyPrefix: string, options: { fields?: string[] } = {}): Promise<ReceivedUpload> {
  const maxBytes = uploadMaxBytes();
  refuseDeclaredOversize(request, maxBytes);
  const contentType = request.headers.get("content-type") ?? "";
  if (!/^multipart\/form-data\s*;/i.test(contentType)) {
    throw new UploadRefusal(415, "Send the file as multipart/form-data with one part named \"file\".");
  }
  if (!request.body) throw new UploadRefusal(400, "The request has no body: send the file in a part named \"file\".");

  let parser: busboy.Busboy;
  try {
    parser = busboy({ headers: { "content-type": contentType }, limits: { files: 2, fields: 10, parts: 12, fieldSize: MAX_FIELD_BYTES }, defParamCharset: "utf8" });
  } catch (error) {
    throw new UploadRefusal(400, `The multipart form cannot be read: ${(error as Error).message}.`);
  }
  const wanted = new Set(options.fields ?? []);
  const fields: Record<string, string> = {};
  // Set from busboy's callbacks (hence the casts: TypeScript does not see those assignments).
  let refusal = null as UploadRefusal | null;
  let storing = null as Promise<StoredObject> | null;
  let fileName = "";

  parser.on("field", (name, value, info) => {
    if (!wanted.has(name)) return;
    if (info.valueTruncated) refusal ??= new UploadRefusal(413, `The "${name}" part is larger than ${formatBytes(MAX_FIELD_BYTES)}.`);
    else fields[name] = value;
  });
  parser.on("file", (name, stream, info) => {
    // Destroying the parser destroys the open file stream with the same error; it is handled below.
    stream.on("error", () => undefined);
    if (name !== "file" || refusal) {
      stream.resume();
      return;
    }
    if (storing) {
      refusal = new UploadRefusal(400, "Send one file per upload.");
      stream.resume();
      parser.destroy(refusal);
      return;
    }
    const badName = extensionProblem(info.filename ?? "");
    if (badName) {
      // Refused on its name: the rest of the body is not read.
      refusal = new UploadRefusal(415, badName);
      stream.resume();
      parser.destroy(refusal);
      return;
    }
    fileName = (info.filename ?? "").normalize("NFC").replace(/[\\/]/g, "_").slice(0, 255);
    storing = putStream(stream, { keyPrefix, maxBytes, checkHead: textProblem });
    // A refusal from storage (too large, not text) stops reading the rest of the body.
    storing.catch((error) => parser.destroy(error instanceof Error ? error : new Error(String(error))));
  });

  const source = Readable.fromWeb(request.body as import("node:stream/web").ReadableStream<Uint8Array>);
  let parseError: unknown = null;
  try {
    await pipeline(source, parser);
  } catch (error) {
    parseError = error;
  }
  let stored = null as StoredObject | null;
  let storeError: unknown = null;
  if (storing) {
    try {
      stored = await storing;
    } catch (error) {
      storeError = error;
    }
  }
  const discard = async () => {
    if (stored) await deleteObject(stored.storage, stored.key).catch(() => undefined);
  };
  if (storeError instanceof StorageUnavailableError) {
    await discard();
    throw new UploadRefusal(503, storeError.message);
  }
  if (storeError instanceof StorageFullError) {
    await discard();
    throw new UploadRefusal(507, storeError.message);
  }
  if (storeError instanceof StorageLimitError) {
    await discard();
    throw new UploadRefusal(storeError.status, storeError.status === 413 ? `${storeError.message} Nothing was stored.` : storeError.message);
  }
  if (refusal) {
    await discard();
    throw refusal;
  }
  if (parseError || storeError) {
    await discard();
    const why = ((parseError ?? storeError) as Error)?.message ?? "unknown";
    throw new UploadRefusal(400, `The upload was interrupted or malformed (${why}); nothing was stored. Send the file again.`);
  }
  if (!stored) throw new UploadRefusal(400, "The form has no part named \"file\": send the log file in it.");
  return { file: { ...stored, fileName }, fields };
}

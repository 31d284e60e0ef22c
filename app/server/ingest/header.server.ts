/** The header of a stored raw file (its first bytes through the engine's inspectLog), for map checks and Logger profiles. */
import { inspectLog } from "~/engine/ingest";
import type { LogHeader } from "~/engine/types";
import { getStream, type StorageKind } from "../storage.server";

const HEAD_BYTES = 256 * 1024;

export async function readHead(storage: StorageKind, key: string, maxBytes = HEAD_BYTES): Promise<Uint8Array> {
  const stream = await getStream(storage, key);
  const chunks: Buffer[] = [];
  let got = 0;
  try {
    for await (const chunk of stream) {
      chunks.push(Buffer.from(chunk));
      got += chunk.length;
      if (got >= maxBytes) break;
    }
  } finally {
    stream.destroy();
  }
  return new Uint8Array(Buffer.concat(chunks).subarray(0, maxBytes));
}

/** The header of a stored file; throws the engine's EngineError when it has none it can read. */
export async function storedHeader(storage: StorageKind, key: string): Promise<LogHeader> {
  return inspectLog(await readHead(storage, key));
}

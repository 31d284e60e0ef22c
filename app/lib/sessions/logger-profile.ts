/**
 * A Logger profile is found by its header signature: the SHA-256 (FIPS 180-4) hex digest of the file's
 * column names, in order, joined with "\n" (UTF-8). The browser and the server compute it the same way,
 * so a profile saved from one file is proposed for the next file with the same header.
 */
import { sha256 } from "@noble/hashes/sha2.js";
import { bytesToHex, utf8ToBytes } from "@noble/hashes/utils.js";

export function headerSignature(columns: readonly string[]): string {
  return bytesToHex(sha256(utf8ToBytes(columns.join("\n"))));
}

/** A signature as the API takes it: 64 lower-case hex digits. */
export const HEADER_SIGNATURE = /^[0-9a-f]{64}$/;

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { isEngineError } from "~/engine/errors";
import { ingestLog } from "~/engine/ingest";
import type { ChannelMap } from "~/engine/types";
import { inPieces } from "./fixtures/logs";

// Bad input always gets a clear, specific message (Rakeline's engine contract, errors.ts). Property:
// a demo export damaged at random — bytes replaced, cut out or doubled, delimiters, quotes, line ends,
// NULs and decimal commas dropped in anywhere, read in chunks of any size — either parses or fails
// with an EngineError whose message is a single line; never another exception, never a hang.
const LOG = "sample-data/logs/marlin-kestrel-comma";
const original = readFileSync(`${LOG}.csv`).subarray(0, 60_000);
const map = JSON.parse(readFileSync(`${LOG}.map.json`, "utf8")) as ChannelMap;
const NASTY = [0x2c, 0x3b, 0x09, 0x22, 0x0a, 0x0d, 0x00, 0x2e, 0x2d, 0x65, 0x20, 0xef, 0xbb, 0xbf, 0xff];

const damage = fc.array(
  fc.record({
    at: fc.nat(),
    kind: fc.constantFrom("replace", "cut", "double", "insert"),
    byte: fc.oneof(fc.constantFrom(...NASTY), fc.integer({ min: 0, max: 255 })),
    length: fc.integer({ min: 1, max: 400 }),
  }),
  { minLength: 1, maxLength: 6 },
);

function applyDamage(bytes: Uint8Array, edits: { at: number; kind: string; byte: number; length: number }[]): Uint8Array {
  let b = Array.from(bytes);
  for (const e of edits) {
    const at = e.at % Math.max(1, b.length);
    if (e.kind === "replace") b[at] = e.byte;
    else if (e.kind === "cut") b.splice(at, e.length);
    else if (e.kind === "double") b.splice(at, 0, ...b.slice(at, at + e.length));
    else b.splice(at, 0, e.byte);
  }
  return Uint8Array.from(b);
}

describe("ingest on damaged exports (property)", () => {
  it("parses or names the problem in one line, for any damage and any chunking", async () => {
    await fc.assert(
      fc.asyncProperty(damage, fc.integer({ min: 97, max: 30_000 }), async (edits, chunkBytes) => {
        const bytes = applyDamage(original, edits);
        try {
          const r = await ingestLog(inPieces(bytes, chunkBytes), map, { onBlock: () => {} });
          expect(r.rows).toBeGreaterThan(0);
        } catch (e) {
          if (!isEngineError(e)) throw e;
          expect(e.message.length).toBeGreaterThan(10);
          expect(e.message).not.toMatch(/\n|undefined|NaN|\[object/);
        }
      }),
      { numRuns: 150, seed: 20261202 },
    );
  });
});

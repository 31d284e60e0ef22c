// Line ends: LF (Unix), CRLF (RFC 4180 section 2.1, and DOS/Windows exports) and a carriage return alone
// (classic Mac OS, which some loggers still write: common practice) all end a line, and a file may mix
// them. The same log written with each of them, and with all three mixed, must give the summary the
// plain LF file gives, however the bytes arrive (chunks cut between a CR and its LF included), and also
// when analysed in parts.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyseLog } from "~/engine/analyse";
import { inspectLog } from "~/engine/ingest";
import { bareCrToLf } from "~/engine/inspect";
import { analyseLogSplit, type LogFileAccess } from "~/engine/split";
import { inPieces } from "./fixtures/logs";

const DIR = join(__dirname, "..", "..", "sample-data");
const car = JSON.parse(readFileSync(join(DIR, "cars", "marlin-sr2.json"), "utf8"));
const map = JSON.parse(readFileSync(join(DIR, "logs", "marlin-kestrel-comma.map.json"), "utf8"));
const text = readFileSync(join(DIR, "logs", "marlin-kestrel-comma.csv"), "utf8");
const lines = text.replace(/\n$/, "").split("\n");
const enc = (s: string) => new TextEncoder().encode(s);

const VARIANTS = {
  crlf: enc(lines.join("\r\n") + "\r\n"),
  cr: enc(lines.join("\r") + "\r"),
  // LF, CR, CRLF in turn (a header line ends with each of them within the first lines).
  mixed: enc(lines.map((l, i) => l + ["\n", "\r", "\r\n"][i % 3]).join("")),
};

// The reference: the file as committed (LF line ends). The byte count differs by the line ends' bytes
// only: it is checked against the input's size, then left out of the comparison.
function plain(s: Awaited<ReturnType<typeof analyseLog>>, size: number) {
  const copy = JSON.parse(JSON.stringify(s));
  expect(copy.log.bytes).toBe(size);
  delete copy.log.bytes;
  return copy;
}
let reference: unknown;
async function lfSummary() {
  reference ??= plain(await analyseLog(inPieces(enc(text), 1 << 16), car, map), enc(text).length);
  return reference;
}

describe("line ends", () => {
  it("the converter turns bare CRs into LF, keeps CRLF, and joins a CRLF cut between two chunks", () => {
    const convert = bareCrToLf();
    const dec = (b: Uint8Array) => new TextDecoder().decode(b);
    expect(dec(convert(enc("a\rb\r\nc\r")))).toBe("a\nb\r\nc\n");
    // The LF of the CRLF whose CR ended the previous chunk.
    expect(dec(convert(enc("\nd\r")))).toBe("d\n");
    expect(dec(convert(enc("e\n")))).toBe("e\n");
  });

  it("the header is found in CR-only and mixed files, and the line end is named", () => {
    expect(inspectLog(VARIANTS.cr.subarray(0, 4096)).lineEnding).toBe("cr");
    expect(inspectLog(VARIANTS.mixed.subarray(0, 4096)).lineEnding).toBe("mixed");
    expect(inspectLog(VARIANTS.crlf.subarray(0, 4096)).lineEnding).toBe("crlf");
    expect(inspectLog(VARIANTS.cr.subarray(0, 4096)).columns).toEqual(inspectLog(enc(text).subarray(0, 4096)).columns);
  });

  for (const [name, bytes] of Object.entries(VARIANTS)) {
    it(`${name}: the same summary as the LF file, whatever the chunk size`, async () => {
      const want = await lfSummary();
      // 1 << 16, and an odd size that cuts many CRLF pairs between chunks.
      for (const size of [1 << 16, 4093]) {
        const s = plain(await analyseLog(inPieces(bytes, size), car, map), bytes.length);
        expect(s, `${name} in ${size}-byte chunks`).toEqual(want);
      }
    });
  }

  it("mixed: analysed in parts, the same summary as the LF file", async () => {
    const bytes = VARIANTS.mixed;
    const access: LogFileAccess = {
      size: bytes.length,
      readAt: async (o, l) => bytes.slice(o, Math.min(bytes.length, o + l)),
      open: (o) => (async function* () { for (let p = o; p < bytes.length; p += 1 << 15) yield bytes.slice(p, Math.min(bytes.length, p + (1 << 15))); })(),
    };
    const reports: unknown[] = [];
    const s = plain(await analyseLogSplit(access, car, map, { parts: 3, minPartBytes: 96 << 10, leadInBytes: 48 << 10 }, (r) => reports.push(r)), bytes.length);
    const lf = plain(await analyseLogSplit({ ...access, size: enc(text).length, readAt: async (o, l) => enc(text).slice(o, o + l), open: (o) => inPieces(enc(text).slice(o), 1 << 15) }, car, map, { parts: 3, minPartBytes: 96 << 10, leadInBytes: 48 << 10 }), enc(text).length);
    // It was read in parts (not whole), as the LF file is.
    expect(reports).toEqual([expect.objectContaining({ parts: 3, whole: null })]);
    expect(s).toEqual(lf);
  });
});

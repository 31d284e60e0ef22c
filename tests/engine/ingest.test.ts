import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { ingestLog } from "~/engine/ingest";
import type { ChannelName } from "~/engine/types";
import { writeExport } from "../../sample-data/export-writer";
import type { ExportDialect } from "../../sample-data/export-writer";
import { METADATA, STINT_MAP, bytesOf, cutAt, inPieces, ingestAll, ingestAllWith, mapWithNames, stintChannels } from "./fixtures/logs";

// Expected values are the written cell text read by Number() (ECMA-262), times the unit factor:
// km/h → m/s 1/3.6 and standard gravity 9.80665 m/s² (NIST SP 811, 2008); s, deg and mm are already
// the engine's units (types.ts). A dropout (NaN) must come back as NaN, never zero.
const FACTOR: Record<string, number> = { s: 1, "km/h": 1 / 3.6, g: 9.80665, deg: 1, mm: 1 };
const UNIT_OF_COLUMN: Record<string, string> = Object.fromEntries(stintChannels(1).map((c) => [c.name, c.unit]));
const CHANNEL_OF_COLUMN = new Map(Object.entries(STINT_MAP).map(([ch, e]) => [e.column, ch as ChannelName]));

function expectedChannels(rows: number, dropoutEvery: number) {
  const out: Partial<Record<ChannelName, Float64Array>> = {};
  for (const c of stintChannels(rows, dropoutEvery)) {
    const ch = CHANNEL_OF_COLUMN.get(c.name)!;
    out[ch] = c.values.map((v) => (Number.isNaN(v) ? NaN : Number(v.toFixed(c.decimals)) * FACTOR[c.unit]));
  }
  return out;
}

const DIALECTS: [string, ExportDialect][] = [
  ["plain comma, LF", {}],
  ["semicolon with decimal comma", { delimiter: ";", decimalComma: true }],
  ["tab with decimal comma and CRLF", { delimiter: "\t", decimalComma: true, crlf: true }],
  ["tab with decimal point", { delimiter: "\t" }],
  ["units row, quoted header, BOM, CRLF", { unitsRow: true, quoteHeader: true, bom: true, crlf: true }],
  ["preamble (delimited) and units row", { preamble: true, unitsRow: true }],
  ["preamble (colon style), semicolon, decimal comma", { preamble: true, preambleStyle: "colon", delimiter: ";", decimalComma: true }],
  ["units in header names, quoted", { unitsInHeader: true, quoteHeader: true }],
];

describe("ingestLog round-trips every export dialect", () => {
  for (const [label, dialect] of DIALECTS) {
    it(label, async () => {
      const rows = 1500;
      const bytes = bytesOf(writeExport(stintChannels(rows, 50), METADATA, dialect));
      const map = dialect.unitsInHeader
        ? mapWithNames(STINT_MAP, (c) => `${c} [${UNIT_OF_COLUMN[c]}]`)
        : STINT_MAP;
      const { result, channels } = await ingestAll(inPieces(bytes, 4096), map, 256);
      const expected = expectedChannels(rows, 50);
      expect(result.rows).toBe(rows);
      expect(result.bytes).toBe(bytes.length);
      for (const ch of Object.keys(expected) as ChannelName[]) expect(channels[ch], ch).toEqual(expected[ch]);
      expect(result.header.delimiter).toBe(dialect.delimiter ?? ",");
      expect(result.header.decimalComma).toBe(!!dialect.decimalComma);
      expect(result.header.unitsRow).toBe(!!dialect.unitsRow);
      expect(result.header.bom).toBe(!!dialect.bom);
      expect(result.header.lineEnding).toBe(dialect.crlf ? "crlf" : "lf");
      if (dialect.preamble) expect(result.header.metadata).toEqual(METADATA);
      if (dialect.unitsRow || dialect.unitsInHeader) expect(result.header.units.slice(0, 3)).toEqual(["s", "km/h", "g"]);
      // Every 50th row from row 7 has an empty cell in each channel but time: 30 dropouts of 1500.
      expect(result.droppedCells[map.speed.column]).toBe(30);
      expect(result.droppedCells[map.time.column]).toBe(0);
    });
  }
});

describe("rows split across chunk boundaries", () => {
  // The header is read from the first `inspectBytes`; rows after it stream through the carry of a
  // partial last row. Every cut over several whole rows covers each byte position in a row.
  const HEAD = 1024;
  const splitText = [...writeExport(stintChannels(220, 9), METADATA, { delimiter: ";", decimalComma: true, crlf: true, unitsRow: true, preamble: true })].join("");
  const splitBytes = new TextEncoder().encode(splitText);
  const ingestCut = async (cuts: number[], blockRows = 64) => {
    const got = await ingestAllWith(cutAt(splitBytes, cuts), STINT_MAP, { blockRows, inspectBytes: HEAD });
    return got;
  };

  it("parse identically at every split point across several rows (CRLF, decimal comma, dropouts)", async () => {
    const whole = await ingestAll(cutAt(splitBytes, []), STINT_MAP);
    expect(whole.result.rows).toBe(220);
    for (let cut = HEAD; cut < HEAD + 400; cut++) {
      const split = await ingestCut([cut]);
      expect(split.result.rows).toBe(220);
      expect(split.channels, `cut at byte ${cut}`).toEqual(whole.channels);
      expect(split.result.droppedCells).toEqual(whole.result.droppedCells);
    }
  });

  it("parse identically under random multi-way splits", async () => {
    const whole = await ingestAll(cutAt(splitBytes, []), STINT_MAP);
    await fc.assert(
      fc.asyncProperty(fc.uniqueArray(fc.integer({ min: 1, max: splitBytes.length - 1 }), { minLength: 1, maxLength: 12 }), async (cuts) => {
        const split = await ingestCut(cuts.sort((a, b) => a - b), 17);
        expect(split.channels).toEqual(whole.channels);
      }),
      { numRuns: 150 },
    );
  });

  it("parse identically when the stream arrives one byte at a time", async () => {
    const bytes = bytesOf(writeExport(stintChannels(210), METADATA, { quoteHeader: true, bom: true, crlf: true }));
    const whole = await ingestAll(cutAt(bytes, []), STINT_MAP);
    const bytewise = await ingestAllWith(inPieces(bytes, 1), STINT_MAP, { blockRows: 50, inspectBytes: 700 });
    expect(bytewise.channels).toEqual(whole.channels);
  });

  it("handles quoted cells, a quoted line break in a text column and cells split inside quotes", async () => {
    const lines = ["Time,Lap Note,Speed,Across,Along,Steer,DFL,DFR,DRL,DRR"];
    for (let i = 0; i < 230; i++) {
      const note = i === 100 ? '"pit call,\nbox this lap"' : i % 3 === 0 ? '"out lap ""cold"""' : "push";
      lines.push(`${(i * 0.05).toFixed(2)},${note},"${100 + i}",1.1,-0.2, "3.5" ,10,11,12,13`);
    }
    const bytes = new TextEncoder().encode(lines.join("\n") + "\n");
    const map = {
      time: { column: "Time", unit: "s" }, speed: { column: "Speed", unit: "m/s" },
      lat_accel: { column: "Across", unit: "g" }, long_accel: { column: "Along", unit: "g" },
      steer: { column: "Steer", unit: "deg" }, damper_fl: { column: "DFL", unit: "mm" },
      damper_fr: { column: "DFR", unit: "mm" }, damper_rl: { column: "DRL", unit: "mm" }, damper_rr: { column: "DRR", unit: "mm" },
    };
    const noteAt = lines.slice(0, 102).join("\n").length - 10;
    for (const cuts of [[], [noteAt], [noteAt - 3, noteAt + 2], [4000]]) {
      const { result, channels } = await ingestAllWith(cutAt(bytes, cuts), map, { blockRows: 32, inspectBytes: 512 });
      expect(result.rows).toBe(230);
      expect(result.header.skippedColumns).toEqual(["Lap Note"]);
      expect(channels.speed![229]).toBe(329);
      expect(channels.steer![101]).toBe(3.5);
      expect(result.droppedCells.Speed).toBe(0);
    }
  });
});

describe("streaming behaviour", () => {
  it("finds a header behind a preamble longer than the first 64 KB", async () => {
    const meta: Record<string, string> = {};
    for (let i = 0; i < 100; i++) meta[`Setup note ${i}`] = "Kestrel Bank, turn 3 ".repeat(40);
    const bytes = bytesOf(writeExport(stintChannels(300), meta, { preamble: true }));
    const { result } = await ingestAll(inPieces(bytes, 16384), STINT_MAP);
    expect(result.header.headerLine).toBe(102);
    expect(Object.keys(result.header.metadata)).toHaveLength(100);
    expect(result.rows).toBe(300);
  });


  it("reports progress in bytes up to the file size and accepts a ReadableStream", async () => {
    const bytes = bytesOf(writeExport(stintChannels(400), METADATA, {}));
    const seen: number[] = [];
    const stream = new ReadableStream<Uint8Array>({
      start(ctl) {
        for (let i = 0; i < bytes.length; i += 1000) ctl.enqueue(bytes.slice(i, i + 1000));
        ctl.close();
      },
    });
    let blocks = 0;
    const result = await ingestLog(stream, STINT_MAP, { onBlock: () => blocks++, onProgress: (b) => seen.push(b), blockRows: 100 });
    expect(seen[seen.length - 1]).toBe(bytes.length);
    expect(seen.every((b, i) => i === 0 || b > seen[i - 1])).toBe(true);
    expect(blocks).toBe(4);
    expect(result.rows).toBe(400);
  });

  it("counts text cells in a numeric column as bad cells (NaN), and drops rows without a time", async () => {
    const lines = ["Time;Speed;Lat;Long;Steer;FL;FR;RL;RR"];
    for (let i = 0; i < 260; i++) {
      const t = i === 5 ? "" : (i * 0.1).toFixed(1).replace(".", ",");
      const speed = i % 50 === 0 ? "ERR" : `${80 + i},5`;
      lines.push(`${t};${speed};0,5;0,1;2;1;2;3;4`);
    }
    const bytes = new TextEncoder().encode(lines.join("\n"));
    const map = {
      time: { column: "Time", unit: "s" }, speed: { column: "Speed", unit: "kph" },
      lat_accel: { column: "Lat", unit: "g" }, long_accel: { column: "Long", unit: "g" },
      steer: { column: "Steer", unit: "deg" }, damper_fl: { column: "FL", unit: "mm" },
      damper_fr: { column: "FR", unit: "mm" }, damper_rl: { column: "RL", unit: "mm" }, damper_rr: { column: "RR", unit: "mm" },
    };
    const { result, channels } = await ingestAll(cutAt(bytes, []), map);
    expect(result.rowsWithoutTime).toBe(1);
    expect(result.rows).toBe(259);
    expect(result.badCells.Speed).toBe(6);
    expect(result.droppedCells.Speed).toBe(6);
    expect(channels.speed![0]).toBeNaN();
    // 1 kph = 1 km/h = 1/3.6 m/s (NIST SP 811, 2008)
    expect(channels.speed![1]).toBe(81.5 * (1 / 3.6));
  });
});

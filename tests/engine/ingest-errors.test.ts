import { describe, expect, it } from "vitest";
import { MIN_DATA_ROWS, ingestLog } from "~/engine/ingest";
import { EngineError } from "~/engine/errors";
import { writeExport } from "../../sample-data/export-writer";
import { METADATA, STINT_MAP, bytesOf, cutAt, inPieces, stintChannels } from "./fixtures/logs";

// Every input problem must surface as an EngineError with a code and a message that names the
// problem concretely (Rakeline's engine contract, errors.ts). Facts checked: the row and values
// named in a message are the ones in the file.
async function failure(bytes: Uint8Array, map: unknown = STINT_MAP, pieces = 0): Promise<EngineError> {
  try {
    await ingestLog(pieces ? inPieces(bytes, pieces) : cutAt(bytes, []), map as never, { onBlock: () => {}, inspectBytes: 2048 });
  } catch (e) {
    if (e instanceof EngineError) return e;
    throw e;
  }
  throw new Error("expected an EngineError");
}

const stint = (rows: number) => [...writeExport(stintChannels(rows), METADATA, { preamble: true })].join("");

describe("ingestLog error paths", () => {
  it("an empty file", async () => {
    const e = await failure(new Uint8Array(0));
    expect([e.code, e.message]).toEqual(["no_header", "the file is empty"]);
  });

  it("a binary file", async () => {
    const bytes = new Uint8Array(70000).map((_, i) => (i % 5 === 0 ? 0 : 65));
    const e = await failure(bytes);
    expect(e.code).toBe("not_text");
    expect(e.message).toMatch(/NUL byte at byte 0/);
  });

  it("no header in the first chunks", async () => {
    const e = await failure(new TextEncoder().encode("just a note\n".repeat(50)));
    expect(e.code).toBe("no_header");
  });

  it("too few rows: says how many there are", async () => {
    const e = await failure(bytesOf([stint(150)]));
    expect(e.code).toBe("too_few_rows");
    expect(e.message).toBe(`the file has only 150 data rows with a time; at least ${MIN_DATA_ROWS} are needed for an estimate`);
  });

  it("time not increasing: names the row, the line and the two values", async () => {
    const text = stint(400).replace("\n5.000,", "\n4.980,"); // row 251 (t = 5.000 s) repeats 4.980
    const lines = text.split("\n");
    const line = lines.findIndex((l) => l.startsWith("4.980,")) + 2; // the second 4.980 is one line later, 1-based
    const e = await failure(new TextEncoder().encode(text), STINT_MAP, 1000);
    expect(e.code).toBe("time_not_increasing");
    expect(e.message).toBe(`time is not increasing at data row 251 (line ${line}): column "Time From Start" goes from 4.98 to 4.98 s; time must increase strictly from row to row`);
  });

  it("time going backwards, in milliseconds", async () => {
    const rows = ["Time,Speed,Lat,Long,Steer,FL,FR,RL,RR"];
    // Row 121 (i = 120) logs 1180 ms after 1190 ms.
    for (let i = 0; i < 300; i++) rows.push(`${i === 120 ? 1180 : i * 10},1,0,0,0,1,1,1,1`);
    const map = { ...STINT_MAP, time: { column: "Time", unit: "ms" }, speed: { column: "Speed", unit: "m/s" }, lat_accel: { column: "Lat", unit: "g" }, long_accel: { column: "Long", unit: "g" }, steer: { column: "Steer", unit: "deg" }, damper_fl: { column: "FL", unit: "mm" }, damper_fr: { column: "FR", unit: "mm" }, damper_rl: { column: "RL", unit: "mm" }, damper_rr: { column: "RR", unit: "mm" }, ride_height_front: undefined };
    const e = await failure(new TextEncoder().encode(rows.join("\n")), JSON.parse(JSON.stringify(map)));
    expect(e.message).toMatch(/^time is not increasing at data row 121 \(line 122\): column "Time" goes from 1190 to 1180 ms/);
  });

  it("a time column written as clock time says what it reads and what to export instead", async () => {
    // Some loggers export a time of day (hh:mm:ss.sss); the engine reads elapsed s or ms only.
    const rows = ["Time,Speed,Lat,Long,Steer,FL,FR,RL,RR"];
    for (let i = 0; i < 300; i++) rows.push(`12:00:${String(Math.floor(i / 100)).padStart(2, "0")}.${String(i % 100).padStart(2, "0")}0,100,0,0,0,30,30,40,40`);
    const map = { time: { column: "Time", unit: "s" }, speed: { column: "Speed", unit: "km/h" }, lat_accel: { column: "Lat", unit: "g" }, long_accel: { column: "Long", unit: "g" }, steer: { column: "Steer", unit: "deg" }, damper_fl: { column: "FL", unit: "mm" }, damper_fr: { column: "FR", unit: "mm" }, damper_rl: { column: "RL", unit: "mm" }, damper_rr: { column: "RR", unit: "mm" } };
    const e = await failure(new TextEncoder().encode(rows.join("\n")), map);
    expect(e.code).toBe("column_not_numeric");
    expect(e.message).toMatch(/^column "Time" mapped to time holds text, not numbers \(it reads "12:00:00\.000"\); clock times are not read: export the time as elapsed seconds or milliseconds; numeric columns are "Speed"/);
  });

  it("a mapped column that is not in the file lists the columns that exist", async () => {
    const map = { ...STINT_MAP, damper_rr: { column: "Stroke RR", unit: "mm" } };
    const e = await failure(bytesOf([stint(300)]), map);
    expect(e.code).toBe("column_missing");
    expect(e.message).toMatch(/^column "Stroke RR" mapped to damper_rr is not in the file; its columns are "Time From Start", "Road Speed", .*"Ride Height Front"$/);
  });

  it("an unknown unit lists the allowed ones", async () => {
    const map = { ...STINT_MAP, damper_fl: { column: "Travel FL", unit: "furlong" } };
    const e = await failure(bytesOf([stint(300)]), map);
    expect(e.code).toBe("unknown_unit");
    expect(e.message).toBe('unit "furlong" for damper_fl is not one Rakeline reads; use one of mm, in, m');
  });

  it("a quoted cell left open at the end of the file", async () => {
    const text = stint(300) + '310.000,"12\n';
    const e = await failure(new TextEncoder().encode(text), STINT_MAP, 4096);
    expect(e.code).toBe("bad_quote");
    expect(e.message).toMatch(/quoted cell opened near line \d+ is never closed/);
  });

  it("keeps a header callback before a map error, so the mapping screen can still show the columns", async () => {
    let columns: string[] = [];
    const bytes = bytesOf([stint(300)]);
    await expect(
      ingestLog(cutAt(bytes, []), { ...STINT_MAP, speed: { column: "Nope", unit: "km/h" } }, { onBlock: () => {}, onHeader: (h) => (columns = h.columns) }),
    ).rejects.toThrow(/column "Nope"/);
    expect(columns[0]).toBe("Time From Start");
  });
});

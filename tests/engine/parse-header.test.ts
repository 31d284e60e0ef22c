import { describe, expect, it } from "vitest";
import { inspectLog } from "~/engine/ingest";
import { EngineError } from "~/engine/errors";

// Dialect facts used below: RFC 4180 (comma-separated values, double-quoted fields, "" for a quote,
// CRLF line ends); the UTF-8 byte-order mark EF BB BF (Unicode Standard, ch. 23.8); ";" as the list
// separator where "," is the decimal mark (common practice in continental European locales).
const enc = (s: string) => new TextEncoder().encode(s);
const rows = (n: number, f: (i: number) => string) => Array.from({ length: n }, (_, i) => f(i)).join("\n");

function expectEngineError(fn: () => unknown, code: string, text: RegExp) {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(EngineError);
    expect((e as EngineError).code).toBe(code);
    expect((e as EngineError).message).toMatch(text);
    return;
  }
  throw new Error("expected an EngineError");
}

describe("inspectLog finds the dialect", () => {
  it("comma file with a decimal point", () => {
    const h = inspectLog(enc("Time,Speed,Side Accel\n" + rows(20, (i) => `${i * 0.01},${100 + i}.5,0.${i}`) + "\n"));
    expect(h.delimiter).toBe(",");
    expect(h.decimalComma).toBe(false);
    expect(h.columns).toEqual(["Time", "Speed", "Side Accel"]);
    expect(h.units).toEqual([null, null, null]);
    expect(h.headerLine).toBe(1);
  });

  it("semicolon file with a decimal comma", () => {
    const h = inspectLog(enc("Time;Speed;Side Accel\n" + rows(20, (i) => `${i},01;${100 + i},5;0,${i}`) + "\n"));
    expect(h.delimiter).toBe(";");
    expect(h.decimalComma).toBe(true);
  });

  it("tab file with a decimal comma and CRLF", () => {
    const h = inspectLog(enc("Time\tSpeed\tSteer\r\n" + rows(20, (i) => `${i},5\t${i},25\t-${i},1\r`) + "\n"));
    expect(h.delimiter).toBe("\t");
    expect(h.decimalComma).toBe(true);
    expect(h.lineEnding).toBe("crlf");
  });

  it("BOM, quoted header cells with a delimiter inside, and a units row", () => {
    const text = '\uFEFF"Time","Speed, GPS","Travel FL"\n"s","km/h","mm"\n' + rows(20, (i) => `${i},${i * 2},${i / 4}`) + "\n";
    const h = inspectLog(enc(text));
    expect(h.bom).toBe(true);
    expect(h.columns).toEqual(["Time", "Speed, GPS", "Travel FL"]);
    expect(h.unitsRow).toBe(true);
    expect(h.units).toEqual(["s", "km/h", "mm"]);
  });

  it("units written in the header names", () => {
    const h = inspectLog(enc("Time [s],Speed (mph),Ride Height F [in]\n" + rows(20, (i) => `${i},${i},1.5`) + "\n"));
    expect(h.units).toEqual(["s", "mph", "in"]);
    expect(h.columns[1]).toBe("Speed (mph)");
  });
});

describe("inspectLog reads the preamble as metadata", () => {
  it("key/value lines in delimited and colon styles, before the header", () => {
    const text = [
      "Session,Kestrel Bank Q2",
      "Car,Marlin SR2,,,",
      "Date: 2026-05-01",
      "Driver = J. Ashby",
      "",
      "Harrowgate Motor Club club day",
      "Time,Speed,Steer",
      rows(20, (i) => `${i},${i + 50},${-i}`),
      "",
    ].join("\n");
    const h = inspectLog(enc(text));
    expect(h.metadata).toEqual({
      Session: "Kestrel Bank Q2",
      Car: "Marlin SR2",
      Date: "2026-05-01",
      Driver: "J. Ashby",
      "line 6": "Harrowgate Motor Club club day",
    });
    expect(h.headerLine).toBe(7);
    expect(h.columns).toEqual(["Time", "Speed", "Steer"]);
  });

  it("a preamble in a semicolon file with a decimal comma", () => {
    const text = "Circuit;Coldwater Ridge\nRun;3\nTime;Speed\n" + rows(30, (i) => `${i},0;${i},5`) + "\n";
    const h = inspectLog(enc(text));
    expect(h.metadata).toEqual({ Circuit: "Coldwater Ridge", Run: "3" });
    expect(h.delimiter).toBe(";");
    expect(h.decimalComma).toBe(true);
  });
});

describe("inspectLog lists text columns and dropouts", () => {
  it("skips non-numeric columns and keeps columns whose cells are empty (dropouts)", () => {
    const text = "Time,Clock,Lap Note,GPS Speed,Speed\n" + rows(40, (i) => `${i},12:00:${10 + i},${i % 2 ? "push" : ""},${i < 30 ? "" : i},${i}`) + "\n";
    const h = inspectLog(enc(text));
    expect(h.skippedColumns).toEqual(["Clock", "Lap Note"]);
    expect(h.numericColumns).toEqual(["Time", "GPS Speed", "Speed"]);
    expect(h.notes.join(" ")).toMatch(/text columns skipped: Clock, Lap Note/);
  });

  it("renames a repeated column name and says so", () => {
    const h = inspectLog(enc("Time,Temp,Temp\n" + rows(20, (i) => `${i},1,2`) + "\n"));
    expect(h.columns).toEqual(["Time", "Temp", "Temp #2"]);
    expect(h.notes[0]).toMatch(/repeats the name "Temp"/);
  });
});

describe("inspectLog refuses what is not a log export", () => {
  it("a binary file (NUL bytes)", () => {
    const bytes = new Uint8Array(4096).map((_, i) => (i * 7) % 256);
    expectEngineError(() => inspectLog(bytes), "not_text", /not text: it contains a NUL byte at byte 0/);
  });

  it("a ZIP archive, a gzip file and UTF-16 text", () => {
    // Magic numbers: ZIP local file header "PK\x03\x04" (PKWARE APPNOTE), gzip 1F 8B (RFC 1952), UTF-16 LE BOM FF FE.
    expectEngineError(() => inspectLog(new Uint8Array([0x50, 0x4b, 3, 4, 20, 0])), "not_text", /ZIP archive/);
    expectEngineError(() => inspectLog(new Uint8Array([0x1f, 0x8b, 8, 0])), "not_text", /gzip/);
    expectEngineError(() => inspectLog(new Uint8Array([0xff, 0xfe, 0x54, 0])), "not_text", /UTF-16/);
  });

  it("text without columns", () => {
    expectEngineError(() => inspectLog(enc("Kestrel Bank notes\nwet track\nno data today\n")), "no_header", /no header found: no delimiter splits/);
  });

  it("a table of text with no numeric rows", () => {
    expectEngineError(() => inspectLog(enc("Name,Role\nAsh,driver\nBea,engineer\nCal,analyst\n")), "no_header", /no header found: none of the first 4 lines/);
  });
});

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { cutAt, ingestAllWith } from "./fixtures/logs";
import type { ChannelMap } from "~/engine/types";

// Reference: ECMAScript Number(string) (ECMA-262 StringToNumber; V8 rounds correctly). The hot loop has
// its own inline fast path, so the row parser is checked against Number() cell by cell, not only
// the standalone cell parser.
const MAP: ChannelMap = {
  time: { column: "Time", unit: "s" },
  speed: { column: "Speed", unit: "m/s" },
  lat_accel: { column: "Lat", unit: "m/s2" },
  long_accel: { column: "Long", unit: "m/s2" },
  steer: { column: "Steer", unit: "deg" },
  damper_fl: { column: "FL", unit: "mm" },
  damper_fr: { column: "FR", unit: "mm" },
  damper_rl: { column: "RL", unit: "mm" },
  damper_rr: { column: "RR", unit: "mm" },
};

const digits = (max: number) => fc.array(fc.constantFrom(..."0123456789"), { maxLength: max }).map((a) => a.join(""));
const cell = fc.oneof(
  fc.double({ noNaN: true, noDefaultInfinity: true }).map(String),
  fc.tuple(fc.double({ min: -1e5, max: 1e5, noNaN: true }), fc.integer({ min: 0, max: 12 })).map(([d, k]) => d.toFixed(k)),
  fc.tuple(fc.constantFrom("", "-", "+"), digits(20), fc.constantFrom("", "."), digits(20), fc.constantFrom("", "e-5", "E+17", "e308", "e-330"))
    .map(([s, i, p, f, e]) => (i + f === "" ? "0" : `${s}${i}${p}${f}${e}`)),
  fc.constantFrom("-0", "0.0", "-0.000", ".5", "5.", "000123", "1e-320", "9007199254740993", "123456789012345", "1234567890123456"),
);

async function parseColumn(cells: string[], decimalComma: boolean) {
  const d = decimalComma ? ";" : ",";
  const lines = [["Time", "Speed", "Lat", "Long", "Steer", "FL", "FR", "RL", "RR"].join(d)];
  const rows = Math.max(200, cells.length);
  for (let i = 0; i < rows; i++) {
    const c = cells[i % cells.length];
    const text = decimalComma ? c.replace(".", ",") : c;
    // The cell under test goes in FL (factor 1, mm) and, quoted, in RR.
    lines.push([String(i), "1", "2", "3", "4", text, "5", "6", `"${text}"`].join(d));
  }
  const bytes = new TextEncoder().encode(lines.join("\n") + "\n");
  return ingestAllWith(cutAt(bytes, [bytes.length >> 1]), MAP, { blockRows: 64, inspectBytes: 256 });
}

/** Number(), except that a value past the double range (Infinity) is an unreadable cell (NaN) by design. */
const finiteNumber = (text: string) => {
  const v = Number(text);
  return v === Infinity || v === -Infinity ? NaN : v;
};

describe("row parser cells equal Number()", () => {
  it("with a decimal point, plain and quoted", async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(cell, { minLength: 1, maxLength: 60 }), async (cells) => {
        const { channels } = await parseColumn(cells, false);
        for (let i = 0; i < 200; i++) {
          const ref = finiteNumber(cells[i % cells.length]);
          if (!Object.is(channels.damper_fl![i], ref) || !Object.is(channels.damper_rr![i], ref)) return false;
        }
        return true;
      }),
      { numRuns: 200 },
    );
  });

  it("with a decimal comma (compared after swapping the comma back)", async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(cell, { minLength: 1, maxLength: 60 }), async (cells) => {
        const { channels } = await parseColumn(cells, true);
        for (let i = 0; i < 200; i++) if (!Object.is(channels.damper_fl![i], finiteNumber(cells[i % cells.length]))) return false;
        return true;
      }),
      { numRuns: 100 },
    );
  });

  it("applies unit factor and invert with one multiply: 36 km/h inverted is −10 m/s", async () => {
    // km/h → m/s 1/3.6 (NIST SP 811, 2008); 36 km/h = 10 m/s.
    const lines = ["Time,Speed,Lat,Long,Steer,FL,FR,RL,RR"];
    for (let i = 0; i < 200; i++) lines.push(`${i / 10},36,0,0,0,0,0,0,0`);
    const bytes = new TextEncoder().encode(lines.join("\n"));
    const map = { ...MAP, speed: { column: "Speed", unit: "km/h", invert: true } };
    const { channels } = await ingestAllWith(cutAt(bytes, []), map, {});
    expect(channels.speed![0]).toBeCloseTo(-10, 12);
    expect(channels.speed![0]).toBe(-(36 * (1 / 3.6)));
  });
});

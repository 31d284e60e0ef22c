import { describe, expect, it } from "vitest";
import { exportHeaderText, exportRowsText, writeExport } from "../../sample-data/export-writer";

// The expected texts are written by hand from RFC 4180 (fields separated by the delimiter, a field
// holding the delimiter or a quote is enclosed in double quotes with "" for a quote, CRLF line
// ends when asked) and the UTF-8 BOM U+FEFF (Unicode Standard, ch. 23.8).
const ch = (name: string, unit: string, values: number[], decimals?: number) => ({ name, unit, values: Float64Array.from(values), decimals });

describe("export writer", () => {
  it("writes fixed decimals, a dropout as an empty cell, and LF line ends", () => {
    const text = [...writeExport([ch("Time", "s", [0, 0.01], 3), ch("Speed", "km/h", [NaN, 101.256], 1)], {}, {})].join("");
    expect(text).toBe("Time,Speed\n0.000,\n0.010,101.3\n");
  });

  it("semicolon, decimal comma, units row, CRLF, BOM and quoted header", () => {
    const text = [...writeExport([ch("Time", "s", [1.5], 2), ch('Lat "G"', "g", [-0.25], 2)], {}, { delimiter: ";", decimalComma: true, unitsRow: true, crlf: true, bom: true, quoteHeader: true })].join("");
    expect(text).toBe('\uFEFF"Time";"Lat ""G"""\r\n"s";"g"\r\n1,50;-0,25\r\n');
  });

  it("preamble in both styles, quoting a value that holds the delimiter", () => {
    const meta = { Venue: "Kestrel Bank Raceway", Note: "wet, then dry" };
    expect(exportHeaderText([{ name: "Time", unit: "s" }], meta, { preamble: true })).toBe('Venue,Kestrel Bank Raceway\nNote,"wet, then dry"\n\nTime\n');
    expect(exportHeaderText([{ name: "Time", unit: "s" }], meta, { preamble: true, preambleStyle: "colon", unitsInHeader: true })).toBe("Venue: Kestrel Bank Raceway\nNote: wet, then dry\n\nTime [s]\n");
  });

  it("streams rows in chunks of the requested size, and refuses a decimal comma with a comma delimiter", () => {
    const values = Array.from({ length: 10 }, (_, i) => i);
    const chunks = [...exportRowsText([ch("Gear", "", values, 0)], {}, { rowsPerChunk: 4 })];
    expect(chunks).toEqual(["0\n1\n2\n3\n", "4\n5\n6\n7\n", "8\n9\n"]);
    expect(() => [...writeExport([ch("Time", "s", [1])], {}, { decimalComma: true })]).toThrow(/needs a ';' or tab delimiter/);
  });
});

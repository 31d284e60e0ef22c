import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { parseNumberText } from "~/engine/parse-number";

// Reference for every check in this file: ECMAScript's Number(string) (ECMA-262, StringToNumber),
// as implemented by V8, which rounds decimal strings correctly to the nearest double.
// One departure, on purpose: a number past the double range (Number("1e309") is Infinity) is no
// measurement, so the parser reads it as an unreadable cell (NaN) and the summary names the column.
const same = (a: number, b: number) => Object.is(a, Number.isFinite(b) || Number.isNaN(b) ? b : NaN);

const digitStr = (min: number, max: number) =>
  fc.array(fc.constantFrom(..."0123456789"), { minLength: min, maxLength: max }).map((a) => a.join(""));

/** Decimal cells in the grammar the parser reads, including adversarial shapes. */
const decimalCell = fc
  .record({
    sign: fc.constantFrom("", "-", "+"),
    zeros: fc.constantFrom("", "0", "000", "0000000000"),
    int: digitStr(0, 25),
    point: fc.boolean(),
    frac: digitStr(0, 25),
    exp: fc.option(
      fc.record({ e: fc.constantFrom("e", "E"), s: fc.constantFrom("", "-", "+"), d: digitStr(1, 4) }),
    ),
    pad: fc.constantFrom("", " ", "  "),
  })
  .map(({ sign, zeros, int, point, frac, exp, pad }) => {
    let mant = zeros + int + (point ? "." + frac : "");
    if (!/[0-9]/.test(mant)) mant = "0" + mant;
    return pad + sign + mant + (exp ? exp.e + exp.s + exp.d : "") + pad;
  });

describe("byte-level number parser equals Number()", () => {
  it("reads a number past the double range as unreadable, not as Infinity", () => {
    for (const c of ["1e309", "-1e309", "1.7976931348623159e308", "123e99999"]) expect(parseNumberText(c), c).toBeNaN();
    expect(parseNumberText("1.7976931348623157e308")).toBe(Number.MAX_VALUE);
  });

  it("on adversarial literal cells", () => {
    const cells = [
      "0", "-0", "+0", "-0.0", ".5", "5.", "-.5", "+.5e1", "+1", "007", "0.1", "0.2", "0.3",
      "1e-320", "5e-324", "2.4703282292062327e-324", "1e-400", "1.7976931348623157e308",
      "1.7976931348623159e308", "1e309", "9007199254740993", "9007199254740992.5",
      "123456789012345678901234567890", "0.000000000000000000000000000001234",
      "3.14159265358979323846264338327950288", "1e22", "1e23", "123456789012345e22",
      "999999999999999", "9999999999999999", "1E5", "1e+5", "1e-5", "-12.500", "  42  ",
      "4.35", "80.17", "1.0000000000000002", "0.30000000000000004", "2.2250738585072014e-308",
    ];
    for (const c of cells) expect(same(parseNumberText(c), Number(c)), c).toBe(true);
  });

  it("on random decimal cells in the grammar", () => {
    fc.assert(
      fc.property(decimalCell, (cell) => same(parseNumberText(cell), Number(cell))),
      { numRuns: 20000 },
    );
  });

  it("on the shortest text of random doubles", () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (d) => {
        const cell = String(d);
        // String(-0) is "0", so compare with === (which equates 0 and -0) against the double itself.
        return same(parseNumberText(cell), Number(cell)) && parseNumberText(cell) === d;
      }),
      { numRuns: 20000 },
    );
  });

  it("on fixed-decimal text as loggers write it", () => {
    fc.assert(
      fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.integer({ min: 0, max: 9 }), (d, k) => {
        const cell = d.toFixed(k);
        return same(parseNumberText(cell), Number(cell));
      }),
      { numRuns: 20000 },
    );
  });

  it("with a decimal comma equals Number() after swapping the comma", () => {
    fc.assert(
      fc.property(decimalCell, (cell) => {
        const comma = cell.replace(".", ",");
        return same(parseNumberText(comma, true), Number(comma.replace(",", ".")));
      }),
      { numRuns: 10000 },
    );
  });

  it("reads no non-number as a number, and agrees with Number() whenever it reads one", () => {
    const junk = fc.oneof(
      fc.string({ maxLength: 12 }),
      fc.array(fc.constantFrom(..."0123456789.+-eE x_,"), { maxLength: 12 }).map((a) => a.join("")),
    );
    fc.assert(
      fc.property(junk.filter((s) => !/[\n\r]/.test(s)), (cell) => {
        const v = parseNumberText(cell);
        return Number.isNaN(v) || same(v, Number(cell));
      }),
      { numRuns: 20000 },
    );
  });

  it("treats empty and non-decimal cells as NaN (dropout or bad cell, never zero)", () => {
    // Number("") is 0 and Number("0x10") is 16 (ECMA-262); a logger cell must not become a number that way.
    for (const c of ["", "   ", ".", "-", "+", "e5", "1e", "1e+", "--1", "1..2", "0x10", "Infinity", "NaN", "1_000", "1,5", "12:03"]) {
      expect(parseNumberText(c), JSON.stringify(c)).toBeNaN();
    }
    // In a decimal-comma file a point is not a decimal separator (it may be a thousands mark).
    expect(parseNumberText("1.5", true)).toBeNaN();
  });
});

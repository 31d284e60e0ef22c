/**
 * Byte-level decimal number parser for CSV cells, written for the ingest hot loop.
 *
 * Grammar (after optional spaces): [+-] digits [sep digits] [(e|E) [+-] digits], at least one mantissa
 * digit, optional trailing spaces, then a terminator (the delimiter, CR or LF). `sep` is "." or "," by
 * file. Anything else is a bad cell (NaN, counted by the caller); an empty cell is a dropout (NaN).
 *
 * Exactness: with at most 15 significant digits the mantissa m is an exact double, and for a decimal
 * exponent |e| ≤ 22 so is 10^e; one IEEE multiply or divide is then correctly rounded, which is the
 * same double `Number()` returns (Clinger's fast path). Longer mantissas and larger exponents fall back
 * to `Number()` on the cell's text, so results are bit-identical to `Number()` in every case.
 * Hex, "Infinity", "1_000" and the like are not read as numbers (Number() would accept some of them).
 */

export const CELL_NUMBER = 0;
export const CELL_EMPTY = 1;
export const CELL_BAD = 2;
/** The cell starts with a quote; the caller unquotes it and calls again on the inner bytes. */
export const CELL_QUOTED = 3;

/** Where the last scan stopped (index of the terminator) and what it found. */
export const scanResult = { end: 0, status: CELL_NUMBER };

const POW10 = new Float64Array(23);
for (let i = 0, v = 1; i < 23; i++, v *= 10) POW10[i] = v;

const SPACE = 32;
const TAB = 9;
const CR = 13;
const LF = 10;

/**
 * Parses the cell starting at `p`. The buffer must contain a terminator (delim, CR or LF) at or after
 * `p`; the loops rely on it instead of bounds checks. Sets scanResult.end to the terminator's index.
 */
export function scanNumber(buf: Uint8Array, p: number, delim: number, decSep: number): number {
  const start = p;
  let c = buf[p];
  while ((c === SPACE || c === TAB) && c !== delim) c = buf[++p];
  if (c === delim || c === LF || c === CR) {
    scanResult.end = p;
    scanResult.status = CELL_EMPTY;
    return NaN;
  }
  if (c === 34) {
    scanResult.end = p;
    scanResult.status = CELL_QUOTED;
    return NaN;
  }
  let neg = false;
  if (c === 45) {
    neg = true;
    c = buf[++p];
  } else if (c === 43) {
    c = buf[++p];
  }
  let m = 0;
  let sig = 0; // significant digits taken into m (leading zeros excluded)
  let digits = 0; // all mantissa digits seen
  let e10 = 0;
  while (c >= 48 && c <= 57) {
    if (sig !== 0 || c !== 48) {
      m = m * 10 + (c - 48);
      sig++;
    }
    digits++;
    c = buf[++p];
  }
  if (c === decSep) {
    c = buf[++p];
    while (c >= 48 && c <= 57) {
      if (sig !== 0 || c !== 48) {
        m = m * 10 + (c - 48);
        sig++;
      }
      e10--;
      digits++;
      c = buf[++p];
    }
  }
  let ok = digits !== 0;
  if (ok && (c === 101 || c === 69)) {
    c = buf[++p];
    let eneg = false;
    if (c === 45) {
      eneg = true;
      c = buf[++p];
    } else if (c === 43) {
      c = buf[++p];
    }
    let ex = 0;
    let ed = 0;
    while (c >= 48 && c <= 57) {
      if (ex < 100000) ex = ex * 10 + (c - 48);
      ed++;
      c = buf[++p];
    }
    if (ed === 0) ok = false;
    e10 += eneg ? -ex : ex;
  }
  const numEnd = p;
  while ((c === SPACE || c === TAB) && c !== delim) c = buf[++p];
  if (!ok || (c !== delim && c !== LF && c !== CR)) {
    while (c !== delim && c !== LF && c !== CR) c = buf[++p];
    scanResult.end = p;
    scanResult.status = CELL_BAD;
    return NaN;
  }
  scanResult.end = p;
  scanResult.status = CELL_NUMBER;
  if (sig <= 15 && e10 >= -22 && e10 <= 22) {
    const v = e10 >= 0 ? m * POW10[e10] : m / POW10[-e10];
    return neg ? -v : v;
  }
  if (sig === 0) return neg ? -0 : 0;
  const v = slowNumber(buf, start, numEnd, decSep);
  // Past the double range (1e309 reads as Infinity): not a measurement; an unreadable cell.
  if (v === Infinity || v === -Infinity) {
    scanResult.status = CELL_BAD;
    return NaN;
  }
  return v;
}

/** Exact fallback: the cell's text (decimal comma swapped) through Number(). */
function slowNumber(buf: Uint8Array, from: number, to: number, decSep: number): number {
  let s = "";
  for (let i = from; i < to; i++) {
    const c = buf[i];
    s += c === decSep ? "." : String.fromCharCode(c);
  }
  return Number(s);
}

const encoder = new TextEncoder();

/**
 * Parses one cell given as text (no delimiter or line break inside): NaN for empty or not a number.
 * Used outside the hot loop (header inspection, tests).
 */
export function parseNumberText(text: string, decimalComma = false): number {
  const bytes = encoder.encode(text + "\n");
  const v = scanNumber(bytes, 0, LF, decimalComma ? 44 : 46);
  return scanResult.status === CELL_NUMBER && scanResult.end === bytes.length - 1 ? v : NaN;
}

/**
 * The ingest hot loop: data rows from bytes straight into per-channel Float64Array blocks, with the
 * unit factor (and invert) applied per cell. No strings, no per-row objects; quoted cells take a
 * slower side path. A region handed to `parse` must end with LF, which lets the inner loops run
 * without bounds checks.
 */
import { EngineError } from "./errors";
import { CELL_BAD, CELL_EMPTY, CELL_NUMBER, CELL_QUOTED, scanNumber, scanResult } from "./parse-number";

const LF = 10;
const CR = 13;
const QUOTE = 34;

export interface RowParserConfig {
  columns: number;
  delimiter: number;
  decimalSeparator: number;
  /** Slot per file column, −1 for columns that are not parsed. */
  slotOfColumn: Int32Array;
  /** Multiplier per slot: unit factor, negated for inverted channels. */
  factor: Float64Array;
  timeSlot: number;
  blockRows: number;
  /** 1-based file line of the first data row (for messages). */
  firstLine: number;
  timeColumn: string;
  timeUnit: string;
  onBlockFull(): void;
}

const POW10 = new Float64Array(16);
for (let i = 0, v = 1; i < 16; i++, v *= 10) POW10[i] = v;

/** Short rows whose time is kept for the warning (a part keeps them all up to this, then the merge takes the first few). */
export const SHORT_ROW_TIMES = 1000;

const fmt = (v: number) => String(Number(v.toPrecision(12)));

export class RowParser {
  /** Per slot, a view of one block of `flat` (rows 0 … blockRows − 1). */
  readonly out: Float64Array[];
  /** All slots' block columns in one array (slot s at s·blockRows): one typed array for the hot loop's stores. */
  private readonly flat: Float64Array;
  /** Per file column: its slot's offset into `flat`, −1 for columns that are not parsed. */
  private readonly baseOfColumn: Int32Array;
  /** Rows filled in the current block. */
  row = 0;
  /** Rows kept so far (with a time), excluding the current block. */
  rowsBefore = 0;
  rowsWithoutTime = 0;
  line: number;
  readonly emptyCells: Float64Array;
  readonly badCells: Float64Array;
  /** Quoted data cells met (a part of a log that starts mid-file cannot tell a quoted line break from a row end). */
  quotedCells = 0;
  /** Rows with fewer cells than the header (left out), and the time of the first SHORT_ROW_TIMES of them (file units; NaN without one). */
  shortRows = 0;
  readonly shortRowTimes: number[] = [];
  /** File column of the time channel. */
  private readonly timeColumn: number;
  private lastTime = -Infinity;
  private readonly cellBuf = new Uint8Array(256);
  private readonly cfg: RowParserConfig;

  constructor(cfg: RowParserConfig) {
    this.cfg = cfg;
    const slots = cfg.factor.length;
    const n = cfg.blockRows;
    this.flat = new Float64Array(slots * n);
    this.out = Array.from({ length: slots }, (_, s) => this.flat.subarray(s * n, (s + 1) * n));
    this.baseOfColumn = Int32Array.from(cfg.slotOfColumn, (s) => (s >= 0 ? s * n : -1));
    this.emptyCells = new Float64Array(slots);
    this.badCells = new Float64Array(slots);
    this.line = cfg.firstLine;
    this.timeColumn = cfg.slotOfColumn.indexOf(cfg.timeSlot);
  }

  private shortRow(t: number): void {
    this.shortRows++;
    if (this.shortRowTimes.length < SHORT_ROW_TIMES) this.shortRowTimes.push(t / this.cfg.factor[this.cfg.timeSlot]);
  }

  /**
   * Parses complete rows in buf[start, end) (buf[end − 1] is LF). Returns the index where parsing
   * stopped: `end`, or the start of a row whose quoted cell runs past `end`.
   */
  parse(buf: Uint8Array, start: number, end: number): number {
    const { columns, delimiter: delim, decimalSeparator: dec, slotOfColumn, factor, timeSlot, blockRows } = this.cfg;
    const flat = this.flat, baseOfColumn = this.baseOfColumn;
    const maxTerminator = Math.max(delim, CR);
    const timeBase = timeSlot * blockRows;
    let p = start;
    let row = this.row;
    // Line number and last time live in locals in the loop (written back at every exit).
    let line = this.line, lastTime = this.lastTime;
    while (p < end) {
      const rowStart = p;
      let c = buf[p];
      if (c === LF) {
        p++;
        line++;
        continue;
      }
      if (c === CR && buf[p + 1] === LF) {
        p += 2;
        line++;
        continue;
      }
      let j = 0;
      for (;;) {
        const base = baseOfColumn[j];
        if (base >= 0) {
          const slot = slotOfColumn[j];
          // Inline fast path for the common cell: [-]digits[sep digits], at most 9 digits, then a
          // terminator. The digits accumulate in 32-bit integer arithmetic (Math.imul: a short
          // dependency chain per digit, where a double multiply-add is twice as long); m < 10^9 and
          // 10^k are exact doubles, so m / 10^k is Number()'s correctly rounded result. Everything
          // else (spaces, exponents, longer mantissas, empty, quoted, bad) goes through scanNumber.
          let q = p;
          c = buf[q];
          const neg = c === 45;
          if (neg) c = buf[++q];
          let m = 0;
          const intStart = q;
          let d = (c - 48) >>> 0;
          while (d < 10) {
            m = (Math.imul(m, 10) + d) | 0;
            d = ((c = buf[++q]) - 48) >>> 0;
          }
          let digits = q - intStart;
          let k = 0;
          if (c === dec) {
            const fracStart = ++q;
            d = ((c = buf[q]) - 48) >>> 0;
            while (d < 10) {
              m = (Math.imul(m, 10) + d) | 0;
              d = ((c = buf[++q]) - 48) >>> 0;
            }
            k = q - fracStart;
            digits += k;
          }
          if (digits !== 0 && digits <= 9 && (c === delim || c === LF || c === CR)) {
            const v = m / POW10[k];
            flat[base + row] = (neg ? -v : v) * factor[slot];
            p = q;
          } else {
            let v = scanNumber(buf, p, delim, dec);
            let status = scanResult.status;
            p = scanResult.end;
            if (status === CELL_QUOTED) {
              p = this.quotedCell(buf, p, end, delim, dec);
              if (p < 0) { this.line = line; this.lastTime = lastTime; return this.stop(rowStart, row); }
              v = this.quotedValue;
              status = this.quotedStatus;
            }
            if (status !== CELL_NUMBER) this.pending(slot, status);
            flat[base + row] = v * factor[slot];
          }
        } else if (buf[p] === QUOTE) {
          p = this.quotedCell(buf, p, end, delim, dec);
          if (p < 0) { this.line = line; this.lastTime = lastTime; return this.stop(rowStart, row); }
        } else {
          c = buf[p];
          for (;;) {
            while (c > maxTerminator) c = buf[++p];
            if (c === delim || c === LF || c === CR) break;
            c = buf[++p];
          }
        }
        j++;
        if (buf[p] !== delim) break;
        p++;
        if (j === columns) break;
      }
      if (j < columns) {
        // Fewer cells than the header: a row cut short, or one that lost a delimiter, whose values may
        // sit in the wrong columns. Left out whole, counted, and named by its time where it has one.
        while (buf[p] !== LF) p++;
        p++;
        this.pendingN = 0;
        this.shortRow(j > this.timeColumn ? flat[timeBase + row] : NaN);
        line++;
        continue;
      }
      while (buf[p] !== LF) p++;
      p++;
      if (this.pendingN !== 0) this.commitPending();
      const t = flat[timeBase + row];
      if (t !== t) {
        this.rowsWithoutTime++;
      } else {
        if (!(t > lastTime)) { this.line = line; this.lastTime = lastTime; this.timeError(t, row); }
        lastTime = t;
        row++;
        if (row === blockRows) {
          this.row = row;
          this.cfg.onBlockFull();
          this.rowsBefore += row;
          row = 0;
        }
      }
      line++;
    }
    this.line = line;
    this.lastTime = lastTime;
    this.row = row;
    return p;
  }

  // Empty and bad cells are counted when their row completes, so a row cut at a chunk edge and
  // parsed again is counted once.
  private readonly pendingSlot = new Int32Array(64);
  private readonly pendingBad = new Uint8Array(64);
  private pendingN = 0;

  private pending(slot: number, status: number): void {
    if (this.pendingN === this.pendingSlot.length) return;
    this.pendingSlot[this.pendingN] = slot;
    this.pendingBad[this.pendingN++] = status === CELL_EMPTY ? 0 : 1;
  }

  private commitPending(): void {
    for (let i = 0; i < this.pendingN; i++) {
      if (this.pendingBad[i]) this.badCells[this.pendingSlot[i]]++;
      else this.emptyCells[this.pendingSlot[i]]++;
    }
    this.pendingN = 0;
  }

  private stop(rowStart: number, row: number): number {
    this.pendingN = 0;
    this.row = row;
    return rowStart;
  }

  private quotedValue = NaN;
  private quotedStatus = CELL_EMPTY;

  /** Reads a quoted cell at `p`; returns the index of its terminator, or −1 if it runs past `end`. */
  private quotedCell(buf: Uint8Array, p: number, end: number, delim: number, dec: number): number {
    this.quotedCells++;
    while (buf[p] !== QUOTE) p++; // leading spaces before the quote
    let n = 0;
    let q = p + 1;
    for (;;) {
      if (q >= end) return -1;
      const c = buf[q];
      if (c === QUOTE) {
        if (q + 1 >= end) return -1;
        if (buf[q + 1] !== QUOTE) break;
        q++;
      }
      if (n < this.cellBuf.length - 1) this.cellBuf[n++] = c === LF ? 32 : c;
      q++;
    }
    q++;
    let c = buf[q];
    let trailing = false;
    while (c !== delim && c !== LF && c !== CR) {
      if (c !== 32 && c !== 9) trailing = true;
      c = buf[++q];
    }
    this.cellBuf[n] = LF;
    this.quotedValue = scanNumber(this.cellBuf, 0, LF, dec);
    this.quotedStatus = scanResult.end !== n || trailing ? CELL_BAD : scanResult.status;
    if (this.quotedStatus !== CELL_NUMBER) this.quotedValue = NaN;
    if (this.quotedStatus === CELL_QUOTED) this.quotedStatus = CELL_BAD;
    return q;
  }

  private timeError(t: number, row: number): never {
    const f = this.cfg.factor[this.cfg.timeSlot];
    const dataRow = this.rowsBefore + row + 1 + this.rowsWithoutTime;
    throw new EngineError(
      "time_not_increasing",
      `time is not increasing at data row ${dataRow} (line ${this.line}): column "${this.cfg.timeColumn}" goes from ${fmt(this.lastTime / f)} to ${fmt(t / f)} ${this.cfg.timeUnit}; time must increase strictly from row to row`,
    );
  }

  /** Rows kept so far, including the current partial block. */
  get rowsKept(): number {
    return this.rowsBefore + this.row;
  }
}


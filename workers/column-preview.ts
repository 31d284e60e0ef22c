/**
 * Previews for the Channel map step: every numeric column of the first minutes of a log, as logged
 * (the file's own units, no invert), decimated to min/max buckets so each chart draws a few hundred
 * points. The engine's own row parser reads the bytes (delimiter, decimal comma and dropouts as in
 * the analysis); rows are bucketed by position, so one bucket covers the same rows in every column
 * and the time column's minimum gives the bucket's time.
 */
import { EngineError } from "../app/engine/errors";
import { scanHeader } from "../app/engine/inspect";
import { RowParser } from "../app/engine/parse-rows";
import type { LogHeader } from "../app/engine/types";

/** Buckets per preview chart. */
export const PREVIEW_BUCKETS = 400;
const BLOCK_ROWS = 1 << 11;

export interface ColumnPreview {
  /** Data rows read from the head of the file. */
  rows: number;
  /** Rows per bucket (the last bucket may hold fewer). */
  bucketRows: number;
  /** Column whose values ordered the rows (the suggested time column when it serves). */
  timeColumn: string;
  /** Per numeric column, the lowest and highest value in each bucket (NaN: only dropouts there). */
  columns: Record<string, { min: Float64Array; max: Float64Array }>;
}

/** Cuts `head` after its last line end (a slice from the start of a file ends mid-row). */
function wholeRows(head: Uint8Array, isWholeFile: boolean): Uint8Array {
  if (isWholeFile) return head;
  let end = head.length;
  while (end > 0 && head[end - 1] !== 10) end--;
  return head.subarray(0, end);
}

/**
 * Reads the numeric columns of `head` (the first bytes of a file; `isWholeFile` when that is all of it).
 * A time column orders the rows (the parser keeps a row only when its time increases): `timeColumn`
 * when it serves, else the first numeric column that does. Null when no column increases row by row.
 */
export function previewColumns(head: Uint8Array, isWholeFile: boolean, timeColumn: string | null, buckets = PREVIEW_BUCKETS): ColumnPreview | null {
  const scan = scanHeader(head, isWholeFile);
  const { header } = scan;
  const numeric = header.numericColumns;
  const candidates = [...(timeColumn !== null && numeric.includes(timeColumn) ? [timeColumn] : []), ...numeric.filter((c) => c !== timeColumn)];
  for (const time of candidates) {
    try {
      return readColumns(head, isWholeFile, scan.dataOffset, scan.dataLine, header, numeric, time, buckets);
    } catch (e) {
      // A column that goes backwards cannot order the rows: try the next one.
      if (e instanceof EngineError && e.code === "time_not_increasing") continue;
      throw e;
    }
  }
  return null;
}

function readColumns(
  head: Uint8Array, isWholeFile: boolean, dataOffset: number, dataLine: number, header: LogHeader,
  numeric: string[], time: string, buckets: number,
): ColumnPreview {
  const slotOfColumn = new Int32Array(header.columns.length).fill(-1);
  numeric.forEach((name, slot) => (slotOfColumn[header.columns.indexOf(name)] = slot));
  const kept: Float64Array[][] = numeric.map(() => []);
  let rows = 0;
  const take = (n: number) => {
    if (n === 0) return;
    parser.out.forEach((col, s) => kept[s].push(col.slice(0, n)));
    rows += n;
  };
  const parser: RowParser = new RowParser({
    columns: header.columns.length,
    delimiter: header.delimiter.charCodeAt(0),
    decimalSeparator: header.decimalComma ? 44 : 46,
    slotOfColumn,
    factor: new Float64Array(numeric.length).fill(1),
    timeSlot: numeric.indexOf(time),
    blockRows: BLOCK_ROWS,
    firstLine: dataLine,
    timeColumn: time,
    timeUnit: "",
    onBlockFull: () => take(BLOCK_ROWS),
  });
  let body = wholeRows(head, isWholeFile).subarray(dataOffset);
  if (body.length > 0 && body[body.length - 1] !== 10) {
    const ended = new Uint8Array(body.length + 1);
    ended.set(body);
    ended[body.length] = 10;
    body = ended;
  }
  if (body.length > 0) parser.parse(body, 0, body.length);
  take(parser.row);
  return { rows, ...decimate(kept, numeric, rows, buckets), timeColumn: time };
}

function decimate(kept: Float64Array[][], numeric: string[], rows: number, buckets: number): Pick<ColumnPreview, "bucketRows" | "columns"> {
  const bucketRows = Math.max(1, Math.ceil(rows / buckets));
  const n = Math.ceil(rows / bucketRows);
  const columns: ColumnPreview["columns"] = {};
  numeric.forEach((name, s) => {
    const min = new Float64Array(n).fill(NaN), max = new Float64Array(n).fill(NaN);
    let row = 0;
    for (const block of kept[s]) {
      for (let i = 0; i < block.length; i++, row++) {
        const v = block[i];
        if (v !== v) continue;
        const b = (row / bucketRows) | 0;
        if (!(v >= min[b])) min[b] = v;
        if (!(v <= max[b])) max[b] = v;
      }
    }
    columns[name] = { min, max };
  });
  return { bucketRows, columns };
}

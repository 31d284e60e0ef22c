/**
 * Ingest API: inspect a log export's header, propose and validate a channel map, and stream the
 * data rows into per-channel blocks in the engine's units. Never holds the whole file: only the
 * first chunk (for the header) and the partial last row of each chunk are kept.
 */
import { EngineError } from "./errors";
import { scanHeader } from "./inspect";
import { validateChannelMap } from "./mapping";
import { RowParser } from "./parse-rows";
import { ALL_CHANNELS } from "./types";
import type { ChannelBlock, ChannelMap, ChannelName, LogHeader } from "./types";
import { CHANNEL_KIND, unitFactor } from "./units";

export type { ChannelBlock, LogHeader } from "./types";
export { suggestChannelMap, validateChannelMap } from "./mapping";

/** Fewer data rows than this cannot give a usable estimate. */
export const MIN_DATA_ROWS = 200;
const HEAD_BYTES = 1 << 16;
const HEAD_BYTES_MAX = 1 << 22;
// 2048 rows: a block's columns and the summary's per-block arrays (smoother delay lines, means,
// slopes, scratch) stay within the CPU cache between the parser and the row passes; 16 K-row
// blocks spilled out of it and roughly doubled the summary's per-row cost.
const DEFAULT_BLOCK_ROWS = 1 << 11;

/** Reads the header from the first chunk of a file (≥ 64 KB, or the whole file if smaller). */
export function inspectLog(firstBytes: Uint8Array): LogHeader {
  return scanHeader(firstBytes, firstBytes.length < HEAD_BYTES).header;
}

export interface IngestOptions {
  onHeader?(h: LogHeader): void;
  onBlock(b: ChannelBlock): void;
  onProgress?(bytesRead: number): void;
  blockRows?: number;
  /** Bytes gathered before the header is read (default 64 KB); more are read if no header is found. */
  inspectBytes?: number;
}

export interface IngestResult {
  header: LogHeader;
  /** Data rows kept (rows with an empty time cell are dropped). */
  rows: number;
  bytes: number;
  /** Per mapped column: cells that became NaN (empty or not a number). */
  droppedCells: Record<string, number>;
  /** Per mapped column: cells holding text that is not a number (part of droppedCells). */
  badCells: Record<string, number>;
  /** Rows dropped because their time cell was empty or not a number. */
  rowsWithoutTime: number;
}

/**
 * A plain Uint8Array view (no copy) of a chunk, so the hot loop only ever sees one array type:
 * Node's Buffer is a Uint8Array subclass, and mixing the two makes element access polymorphic.
 */
function plain(chunk: Uint8Array): Uint8Array {
  return Object.getPrototypeOf(chunk) === Uint8Array.prototype ? chunk : new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.length);
}

async function* chunksOf(source: AsyncIterable<Uint8Array> | ReadableStream<Uint8Array>): AsyncGenerator<Uint8Array> {
  if (typeof (source as ReadableStream<Uint8Array>).getReader === "function") {
    const reader = (source as ReadableStream<Uint8Array>).getReader();
    try {
      for (;;) {
        const { done, value } = await reader.read();
        if (done) return;
        if (value.length) yield plain(value);
      }
    } finally {
      reader.releaseLock();
    }
  } else {
    for await (const chunk of source as AsyncIterable<Uint8Array>) if (chunk.length) yield plain(chunk);
  }
}

function concat(a: Uint8Array, b: Uint8Array): Uint8Array {
  const out = new Uint8Array(a.length + b.length);
  out.set(a, 0);
  out.set(b, a.length);
  return out;
}

const EMPTY: Uint8Array = new Uint8Array(0);

export async function ingestLog(
  source: AsyncIterable<Uint8Array> | ReadableStream<Uint8Array>,
  map: ChannelMap,
  opts: IngestOptions,
): Promise<IngestResult> {
  const chunks = chunksOf(source);
  let bytes = 0;
  let head: Uint8Array = EMPTY;
  let done = false;
  const pull = async (until: number) => {
    while (!done && head.length < until) {
      const r = await chunks.next();
      if (r.done) done = true;
      else {
        head = head.length ? concat(head, r.value) : r.value.slice();
        bytes += r.value.length;
        opts.onProgress?.(bytes);
      }
    }
  };
  await pull(Math.max(1, opts.inspectBytes ?? HEAD_BYTES));
  if (head.length === 0) throw new EngineError("no_header", "the file is empty");
  let scan;
  try {
    scan = scanHeader(head, done);
  } catch (e) {
    if (done || !(e instanceof EngineError) || e.code !== "no_header") throw e;
    await pull(HEAD_BYTES_MAX);
    scan = scanHeader(head, done);
  }
  const { header } = scan;
  opts.onHeader?.(header);
  const checked = validateChannelMap(map, header);

  const mapped = ALL_CHANNELS.filter((c) => checked[c] !== undefined);
  const slotOfColumn = new Int32Array(header.columns.length).fill(-1);
  const factor = new Float64Array(mapped.length);
  mapped.forEach((channel, slot) => {
    const entry = checked[channel]!;
    slotOfColumn[header.columns.indexOf(entry.column)] = slot;
    factor[slot] = unitFactor(CHANNEL_KIND[channel], entry.unit)! * (entry.invert ? -1 : 1);
  });
  const blockRows = Math.max(1, Math.floor(opts.blockRows ?? DEFAULT_BLOCK_ROWS));
  const emit = (rows: number) => {
    if (rows === 0) return;
    const channels: { [K in ChannelName]?: Float64Array } = {};
    mapped.forEach((channel, slot) => {
      const a = parser.out[slot];
      channels[channel] = rows === a.length ? a : a.subarray(0, rows);
    });
    opts.onBlock({ rows, channels });
  };
  const parser: RowParser = new RowParser({
    columns: header.columns.length,
    delimiter: header.delimiter.charCodeAt(0),
    decimalSeparator: header.decimalComma ? 44 : 46,
    slotOfColumn,
    factor,
    timeSlot: mapped.indexOf("time"),
    blockRows,
    firstLine: scan.dataLine,
    timeColumn: checked.time.column,
    timeUnit: checked.time.unit,
    onBlockFull: () => emit(blockRows),
  });

  let carry: Uint8Array = EMPTY;
  const feed = (chunk: Uint8Array): void => {
    if (carry.length === 0) {
      const lastLf = chunk.lastIndexOf(10);
      if (lastLf < 0) {
        carry = chunk.slice();
        return;
      }
      const stopped = parser.parse(chunk, 0, lastLf + 1);
      carry = stopped < chunk.length ? chunk.slice(stopped) : EMPTY;
      return;
    }
    const firstLf = chunk.indexOf(10);
    if (firstLf < 0) {
      carry = concat(carry, chunk);
      return;
    }
    const stitched = concat(carry, chunk.subarray(0, firstLf + 1));
    if (parser.parse(stitched, 0, stitched.length) < stitched.length) {
      // A quoted cell holds a line break: join the whole chunk and let the row finish where it does.
      const joined = concat(carry, chunk);
      carry = EMPTY;
      feed(joined);
      return;
    }
    carry = EMPTY;
    feed(chunk.subarray(firstLf + 1));
  };

  feed(head.subarray(scan.dataOffset));
  head = EMPTY;
  for (;;) {
    const r = await chunks.next();
    if (r.done) break;
    bytes += r.value.length;
    feed(r.value);
    opts.onProgress?.(bytes);
  }
  if (carry.length) {
    const last = concat(carry, new Uint8Array([10]));
    if (parser.parse(last, 0, last.length) < last.length) {
      throw new EngineError("bad_quote", `a quoted cell opened near line ${parser.line} is never closed; the file is cut short or its quotes are broken`);
    }
  }
  emit(parser.row);

  const rows = parser.rowsKept;
  if (rows < MIN_DATA_ROWS) {
    throw new EngineError("too_few_rows", `the file has only ${rows} data rows with a time; at least ${MIN_DATA_ROWS} are needed for an estimate`);
  }
  const droppedCells: Record<string, number> = {};
  const badCells: Record<string, number> = {};
  mapped.forEach((channel, slot) => {
    const column = checked[channel]!.column;
    droppedCells[column] = parser.emptyCells[slot] + parser.badCells[slot];
    badCells[column] = parser.badCells[slot];
  });
  return { header, rows, bytes, droppedCells, badCells, rowsWithoutTime: parser.rowsWithoutTime };
}

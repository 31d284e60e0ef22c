/**
 * Ingest API: inspect a log export's header, propose and validate a channel map, and stream the
 * data rows into per-channel blocks in the engine's units. Never holds the whole file: only the
 * first chunk (for the header) and the partial last row of each chunk are kept.
 */
import { EngineError, PartUnsafe } from "./errors";
import { bareCrToLf, scanHeader } from "./inspect";
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
  /** Rows left out for having fewer cells than the header, and the times (file units, NaN without one) of the first of them. */
  shortRows: ShortRows;
}

export interface ShortRows { count: number; times: number[] }

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
    let finished = false;
    try {
      for (;;) {
        const { done, value } = await reader.read();
        if (done) {
          finished = true;
          return;
        }
        if (value.length) yield plain(value);
      }
    } finally {
      // Left early (a part that has all it needs, or an error): the rest of the stream is not wanted.
      if (!finished) await reader.cancel().catch(() => {});
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

type CheckedMap = ReturnType<typeof validateChannelMap>;

interface Sink {
  parser: RowParser;
  mapped: ChannelName[];
  /** Parses every complete row of the chunk; the partial last row is carried to the next chunk. */
  feed(chunk: Uint8Array): void;
  /** True when no partial row is carried (the bytes fed so far end at a row end). */
  readonly atRowEnd: boolean;
  /** End of stream: the carried last row (no final line break; dropped if the read was cut off) and the partial block. */
  end(cutOff?: boolean): void;
}

/** The row parser for a mapped header, with the chunk stitching around it. */
function createSink(header: LogHeader, checked: CheckedMap, firstLine: number, opts: { blockRows?: number; onBlock(b: ChannelBlock): void }): Sink {
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
    firstLine,
    timeColumn: checked.time.column,
    timeUnit: checked.time.unit,
    onBlockFull: () => emit(blockRows),
  });

  let carry: Uint8Array = EMPTY;
  const feed = (chunk: Uint8Array): void => {
    if (chunk.length === 0) return;
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
  // CR-only or mixed line ends (inspect.ts): bare CRs become LF before the row parser sees them.
  const normalise = header.lineEnding === "cr" || header.lineEnding === "mixed" ? bareCrToLf() : null;
  return {
    parser,
    mapped,
    feed: normalise ? (chunk) => feed(normalise(chunk)) : feed,
    get atRowEnd() {
      return carry.length === 0;
    },
    end(cutOff = false) {
      if (carry.length && !cutOff) {
        const last = concat(carry, new Uint8Array([10]));
        carry = EMPTY;
        if (parser.parse(last, 0, last.length) < last.length) {
          throw new EngineError("bad_quote", `a quoted cell opened near line ${parser.line} is never closed; the file is cut short or its quotes are broken`);
        }
      }
      emit(parser.row);
    },
  };
}

export interface IngestPartOptions {
  /** File offset of the source's first byte. */
  startOffset: number;
  /** The source starts mid-row: skip to the first line break (parts after the first). */
  skipToLine: boolean;
  /** File offsets [ownedFrom, ownedTo) whose rows this part counts (both at row starts). */
  ownedFrom: number;
  ownedTo: number;
  onBlock(b: ChannelBlock): void;
  /** Checked after each chunk: true ends the read (the part has all it needs). */
  shouldStop?(): boolean;
  /** Owned bytes read so far, after each chunk. */
  onProgress?(ownedBytes: number): void;
  blockRows?: number;
}

/** Row and cell counts of one part's owned bytes (the cell counts as in IngestResult). */
export interface PartIngest {
  rows: number;
  rowsWithoutTime: number;
  shortRows: ShortRows;
  droppedCells: Record<string, number>;
  badCells: Record<string, number>;
  bytes: number;
}

/** Throws too_few_rows when `rows` data rows cannot give an estimate. */
export function requireEnoughRows(rows: number): void {
  if (rows < MIN_DATA_ROWS) {
    throw new EngineError("too_few_rows", `the file has only ${rows} data rows with a time; at least ${MIN_DATA_ROWS} are needed for an estimate`);
  }
}

/** Per mapped column: cells that became NaN (empty or not a number), and the not-a-number ones alone. */
function cellCounts(sink: Sink, checked: CheckedMap, empty: ArrayLike<number>, bad: ArrayLike<number>): Pick<IngestResult, "droppedCells" | "badCells"> {
  const droppedCells: Record<string, number> = {};
  const badCells: Record<string, number> = {};
  sink.mapped.forEach((channel, slot) => {
    const column = checked[channel]!.column;
    droppedCells[column] = empty[slot] + bad[slot];
    badCells[column] = bad[slot];
  });
  return { droppedCells, badCells };
}

interface Counts {
  rows: number;
  rowsWithoutTime: number;
  shortRows: number;
  shortTimes: number;
  empty: Float64Array;
  bad: Float64Array;
}

/**
 * Streams one byte range of a log whose header is known (read by the whole-log scan), for analysis
 * in parts. Rows before `ownedFrom` and after `ownedTo` are parsed (the summary needs them as
 * lead-in and run-out) but not counted. Throws PartUnsafe when the range cannot be read on its own.
 */
export async function ingestPart(
  source: AsyncIterable<Uint8Array> | ReadableStream<Uint8Array>,
  map: ChannelMap,
  header: LogHeader,
  opts: IngestPartOptions,
): Promise<PartIngest> {
  const checked = validateChannelMap(map, header);
  const sink = createSink(header, checked, 1, opts);
  const parser = sink.parser;
  const snap = (): Counts => ({ rows: parser.rowsKept, rowsWithoutTime: parser.rowsWithoutTime, shortRows: parser.shortRows, shortTimes: parser.shortRowTimes.length, empty: parser.emptyCells.slice(), bad: parser.badCells.slice() });
  const boundaries = [opts.ownedFrom, opts.ownedTo];
  const taken: Counts[] = [];
  let pos = opts.startOffset;
  let synced = !opts.skipToLine;
  const take = () => {
    if (!sink.atRowEnd) throw new PartUnsafe("a part boundary falls inside a row");
    taken.push(snap());
  };
  const chunks = chunksOf(source);
  let stopped = false;
  try {
    for (;;) {
      const r = await chunks.next();
      if (r.done) break;
      let chunk = r.value;
      const chunkStart = pos;
      pos += chunk.length;
      if (!synced) {
        const lf = chunk.indexOf(10);
        if (lf < 0) continue;
        synced = true;
        chunk = chunk.subarray(lf + 1);
      }
      let at = pos - chunk.length;
      while (taken.length < 2 && boundaries[taken.length] <= pos) {
        const b = Math.max(boundaries[taken.length], at);
        sink.feed(chunk.subarray(0, b - at));
        chunk = chunk.subarray(b - at);
        at = b;
        take();
      }
      sink.feed(chunk);
      if (parser.quotedCells > 0) throw new PartUnsafe("the log has quoted cells");
      opts.onProgress?.(Math.max(0, Math.min(pos, opts.ownedTo) - opts.ownedFrom));
      if (chunkStart >= opts.ownedTo && opts.shouldStop?.()) {
        stopped = true;
        break;
      }
    }
  } finally {
    await chunks.return(undefined);
  }
  // A read stops only past ownedTo, so a cut-off last row is never an owned one.
  sink.end(stopped);
  while (taken.length < 2) taken.push(snap());
  if (parser.quotedCells > 0) throw new PartUnsafe("the log has quoted cells");
  const [a, b] = taken;
  return {
    rows: b.rows - a.rows,
    rowsWithoutTime: b.rowsWithoutTime - a.rowsWithoutTime,
    shortRows: { count: b.shortRows - a.shortRows, times: parser.shortRowTimes.slice(a.shortTimes, b.shortTimes) },
    ...cellCounts(sink, checked, b.empty.map((x, i) => x - a.empty[i]), b.bad.map((x, i) => x - a.bad[i])),
    bytes: Math.min(pos, opts.ownedTo) - opts.ownedFrom,
  };
}

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

  const sink = createSink(header, checked, scan.dataLine, opts);
  sink.feed(head.subarray(scan.dataOffset));
  head = EMPTY;
  for (;;) {
    const r = await chunks.next();
    if (r.done) break;
    bytes += r.value.length;
    sink.feed(r.value);
    opts.onProgress?.(bytes);
  }
  sink.end();
  const parser = sink.parser;
  const rows = parser.rowsKept;
  requireEnoughRows(rows);
  return { header, rows, bytes, ...cellCounts(sink, checked, parser.emptyCells, parser.badCells), rowsWithoutTime: parser.rowsWithoutTime, shortRows: { count: parser.shortRows, times: parser.shortRowTimes.slice() } };
}

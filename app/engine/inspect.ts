/**
 * Reads the top of a log export: checks that it is text, finds the delimiter, decimal comma,
 * preamble (kept as metadata), header, optional units row and which columns are numeric.
 * Works on the first chunk only (≥ 64 KB is plenty); the streaming parser takes over from `dataOffset`.
 */
import { EngineError } from "./errors";
import { canonicalUnit } from "./units";
import type { LogDelimiter, LogHeader } from "./types";

export interface HeaderScan {
  header: LogHeader;
  /** Byte offset of the first data row. */
  dataOffset: number;
  /** 1-based file line number of the first data row. */
  dataLine: number;
}

const MAX_LINES = 400;
const DELIMITERS: LogDelimiter[] = ["\t", ";", ","];
const decoder = new TextDecoder("utf-8");

export function checkIsText(bytes: Uint8Array): void {
  if (bytes.length >= 2 && ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff))) {
    throw new EngineError("not_text", "the file is UTF-16 text; export it as UTF-8 (or plain ASCII) CSV");
  }
  if (bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 3 && bytes[3] === 4) {
    throw new EngineError("not_text", "the file is a ZIP archive, not a text export; unpack it and upload the CSV inside");
  }
  if (bytes[0] === 0x1f && bytes[1] === 0x8b) {
    throw new EngineError("not_text", "the file is gzip-compressed, not a text export; decompress it first");
  }
  const n = Math.min(bytes.length, 1 << 16);
  let control = 0;
  for (let i = 0; i < n; i++) {
    const c = bytes[i];
    if (c === 0) {
      throw new EngineError("not_text", `the file is not text: it contains a NUL byte at byte ${i}; upload the logger's CSV/text export, not its binary file`);
    }
    if (c < 32 && c !== 9 && c !== 10 && c !== 13 && c !== 12) control++;
  }
  if (control > n / 100) {
    throw new EngineError("not_text", `the file is not text: ${control} control bytes in its first ${n} bytes; upload the logger's CSV/text export`);
  }
}

/** Splits one line on `delim`, honouring double quotes ("" inside quotes is a quote). */
export function splitCells(line: string, delim: string): string[] {
  if (line.indexOf('"') < 0) return line.split(delim);
  const out: string[] = [];
  let cell = "";
  let inQuotes = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (inQuotes) {
      if (ch === '"' && line[i + 1] === '"') (cell += '"'), i++;
      else if (ch === '"') inQuotes = false;
      else cell += ch;
    } else if (ch === '"') inQuotes = true;
    else if (ch === delim) out.push(cell), (cell = "");
    else cell += ch;
  }
  out.push(cell);
  return out;
}

interface Line {
  text: string;
  start: number;
  number: number;
}

/** True when a CR is not followed by LF (a CR that ends a head cut mid-file is undecided and not counted). */
function hasBareCr(bytes: Uint8Array, isWholeFile: boolean): boolean {
  for (let i = bytes.indexOf(13); i >= 0; i = bytes.indexOf(13, i + 1)) {
    if (i + 1 < bytes.length ? bytes[i + 1] !== 10 : isWholeFile) return true;
  }
  return false;
}

/**
 * A converter of a byte stream, chunk by chunk, that turns every CR not followed by LF into LF (a copy of
 * the chunk; CRLF stays). A CRLF split between two chunks is one line end: the CR at the end of a chunk
 * becomes LF, and an LF that starts the next chunk is then dropped.
 */
export function bareCrToLf(): (chunk: Uint8Array) => Uint8Array {
  let endedWithCr = false;
  return (chunk) => {
    const out = chunk.slice(endedWithCr && chunk[0] === 10 ? 1 : 0);
    for (let i = out.indexOf(13); i >= 0; i = out.indexOf(13, i + 1)) {
      if (out[i + 1] !== 10) out[i] = 10;
    }
    if (chunk.length) endedWithCr = chunk[chunk.length - 1] === 13;
    return out;
  };
}

function readLines(bytes: Uint8Array, from: number, isWholeFile: boolean): { lines: Line[]; crlf: boolean } {
  const lines: Line[] = [];
  let crlf = false;
  let p = from;
  let number = 1;
  while (p < bytes.length && lines.length < MAX_LINES) {
    let nl = bytes.indexOf(10, p);
    if (nl < 0) {
      if (!isWholeFile) break;
      nl = bytes.length;
    }
    let end = nl;
    if (end > p && bytes[end - 1] === 13) (end--, (crlf = true));
    lines.push({ text: decoder.decode(bytes.subarray(p, end)), start: p, number });
    number++;
    p = nl + 1;
  }
  return { lines, crlf };
}

const isBlank = (s: string) => s.trim() === "";
// Same grammar as parse-number.ts (decimal numbers only), as a regex: cheap enough for a header scan.
const NUM_POINT = /^[ \t]*[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?[ \t]*$/;
const NUM_COMMA = /^[ \t]*[+-]?(\d+,?\d*|,\d+)([eE][+-]?\d+)?[ \t]*$/;
const isNum = (s: string, comma: boolean) => (comma ? NUM_COMMA : NUM_POINT).test(s);
const unquote = (s: string) => s.trim().replace(/^"(.*)"$/, "$1").trim();

function modeOf(values: number[]): number {
  const counts = new Map<number, number>();
  let best = 0;
  let bestN = 0;
  for (const v of values) {
    const n = (counts.get(v) ?? 0) + 1;
    counts.set(v, n);
    if (n > bestN || (n === bestN && v > best)) (best = v), (bestN = n);
  }
  return best;
}

function detectDelimiter(lines: Line[]): { delim: LogDelimiter; fields: number } | null {
  const body = lines.filter((l) => !isBlank(l.text));
  const tail = body.slice(Math.floor(body.length / 2));
  let best: { delim: LogDelimiter; fields: number; score: number } | null = null;
  for (const d of DELIMITERS) {
    const counts = body.map((l) => splitCells(l.text, d).length);
    const n = modeOf(counts.slice(Math.floor(body.length / 2)));
    if (n < 2 || tail.length === 0) continue;
    const score = counts.filter((c) => c === n).length;
    if (score >= 2 && (!best || score > best.score)) best = { delim: d, fields: n, score };
  }
  return best && { delim: best.delim, fields: best.fields };
}

function metadataFrom(lines: Line[], delim: LogDelimiter): Record<string, string> {
  const meta: Record<string, string> = {};
  for (const { text, number } of lines) {
    const t = text.trim();
    if (t === "") continue;
    let key: string;
    let value: string;
    const kv = /^([^:=,;\t]+?)\s*[:=]\s*(.*)$/.exec(t);
    const sep = [delim, ",", ";", "\t"].find((d) => t.includes(d));
    if (kv) (key = kv[1]), (value = kv[2]);
    else if (sep) {
      const cells = splitCells(t, sep).map(unquote);
      while (cells.length > 1 && cells[cells.length - 1] === "") cells.pop();
      key = cells[0];
      value = cells.slice(1).join(", ");
    } else (key = `line ${number}`), (value = t);
    key = unquote(key);
    if (key === "") key = `line ${number}`;
    meta[key in meta ? `${key} (line ${number})` : key] = unquote(value);
  }
  return meta;
}

function unitFromName(name: string): string | null {
  const m = /[[(]([^\])]+)[\])]\s*$/.exec(name);
  return m ? m[1].trim() : null;
}

export function scanHeader(bytes: Uint8Array, isWholeFile: boolean): HeaderScan {
  checkIsText(bytes);
  const bom = bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf;
  // A CR not followed by LF ends a line too (old Mac exports, or such lines mixed in): the head is read
  // with those CRs as LF (same length, so offsets hold), and the row parser's input is treated alike.
  const bareCr = hasBareCr(bytes, isWholeFile);
  const { lines, crlf } = readLines(bareCr ? bareCrToLf()(bytes) : bytes, bom ? 3 : 0, isWholeFile);
  const found = detectDelimiter(lines);
  const noHeader = (why: string) =>
    new EngineError("no_header", `no header found: ${why}. Expected a line of column names followed by rows of numbers separated by commas, semicolons or tabs`);
  if (!found) throw noHeader(`no delimiter splits the first ${lines.length} lines into consistent columns`);
  const { delim, fields } = found;
  const cells = lines.map((l) => splitCells(l.text, delim));
  const comma = delim !== ",";
  const numericShare = (row: string[], decimalComma: boolean) => {
    const filled = row.filter((c) => !isBlank(c));
    return filled.length === 0 ? 0 : filled.filter((c) => isNum(c, decimalComma) || (comma && isNum(c, !decimalComma))).length / filled.length;
  };
  const isDataRow = (i: number) => cells[i]?.length === fields && numericShare(cells[i], false) >= 0.5;
  const isUnitsRow = (i: number) =>
    cells[i]?.length === fields && cells[i].some((c) => !isBlank(c)) && numericShare(cells[i], false) === 0;

  let h = -1;
  for (let i = 0; i < cells.length && h < 0; i++) {
    const row = cells[i];
    if (row.length !== fields || numericShare(row, false) >= 0.5 || row.filter(isBlank).length > fields / 2) continue;
    // Two data rows in a row (where the sample has them), so a "key;value" preamble line is not taken for data.
    const dataFrom = (k: number) => isDataRow(k) && (k + 1 >= cells.length || isDataRow(k + 1));
    if (dataFrom(i + 1) || (isUnitsRow(i + 1) && dataFrom(i + 2))) h = i;
  }
  if (h < 0) throw noHeader(`none of the first ${lines.length} lines is a row of ${fields} column names followed by data rows`);
  const unitsRow = isUnitsRow(h + 1);
  const first = h + (unitsRow ? 2 : 1);
  const dataRows = cells.slice(first).filter((r) => r.length === fields);

  let commaCells = 0;
  let pointCells = 0;
  for (const r of dataRows) for (const c of r) if (/^\s*[+-]?(\d+,\d*|,\d)/.test(c)) commaCells++; else if (/^\s*[+-]?(\d+\.\d*|\.\d)/.test(c)) pointCells++;
  const decimalComma = comma && commaCells > pointCells;

  const notes: string[] = [];
  const seen = new Map<string, number>();
  const columns = cells[h].map((raw, i) => {
    let name = unquote(raw);
    if (name === "") name = `column ${i + 1}`;
    const k = (seen.get(name) ?? 0) + 1;
    seen.set(name, k);
    if (k > 1) {
      notes.push(`column ${i + 1} repeats the name "${name}"; it is called "${name} #${k}" here`);
      name = `${name} #${k}`;
    }
    return name;
  });
  const units = columns.map((name, i) => {
    const u = unitsRow ? unquote(cells[h + 1][i]) : unitFromName(name);
    return u ? canonicalUnit(u) : null;
  });
  const numericColumns: string[] = [];
  const skippedColumns: string[] = [];
  const textSamples: Record<string, string> = {};
  columns.forEach((name, i) => {
    const filled = dataRows.map((r) => r[i]).filter((c) => !isBlank(c));
    const numeric = filled.filter((c) => isNum(c, decimalComma)).length;
    if (filled.length === 0 || numeric >= 0.9 * filled.length) numericColumns.push(name);
    else {
      skippedColumns.push(name);
      textSamples[name] = unquote(filled.find((c) => !isNum(c, decimalComma)) ?? filled[0]).trim().slice(0, 40);
    }
  });
  if (skippedColumns.length) notes.push(`text columns skipped: ${skippedColumns.join(", ")}`);
  if (dataRows.length === 0) throw noHeader("the header has no data rows under it");

  const header: LogHeader = {
    columns,
    units,
    metadata: metadataFrom(lines.slice(0, h), delim),
    delimiter: delim,
    decimalComma,
    numericColumns,
    skippedColumns,
    textSamples,
    unitsRow,
    bom,
    lineEnding: bareCr ? (bytes.indexOf(10) < 0 ? "cr" : "mixed") : crlf ? "crlf" : "lf",
    headerLine: lines[h].number,
    notes,
  };
  return { header, dataOffset: lines[first].start, dataLine: lines[first].number };
}

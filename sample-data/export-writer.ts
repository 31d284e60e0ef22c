/**
 * Writes channel columns as a data-logger style text export in a chosen dialect, as a stream of
 * string chunks (so a 500 MB file never sits in memory). Used by the demo generator and the bench,
 * and by the parser tests to round-trip every dialect.
 */

export interface ExportChannel {
  name: string;
  unit: string;
  values: Float64Array;
  /** Fixed decimals for this channel; shortest round-trip text when omitted. */
  decimals?: number;
}

export interface ExportDialect {
  delimiter?: "," | ";" | "\t";
  /** Write 12,5 instead of 12.5 (needs a ";" or tab delimiter). */
  decimalComma?: boolean;
  /** A row of units under the header. */
  unitsRow?: boolean;
  /** Units in the header text, e.g. "Speed [km/h]". */
  unitsInHeader?: boolean;
  /** Metadata lines before the header. */
  preamble?: boolean;
  /** "delimited": `Session,Kestrel Bank Q2`; "colon": `Session: Kestrel Bank Q2`. */
  preambleStyle?: "delimited" | "colon";
  crlf?: boolean;
  bom?: boolean;
  /** Quote every header (and units-row) cell. */
  quoteHeader?: boolean;
}

export interface ExportOptions {
  rowsPerChunk?: number;
}

type ChannelMeta = Pick<ExportChannel, "name" | "unit">;

function resolve(d: ExportDialect) {
  const delimiter = d.delimiter ?? ",";
  if (d.decimalComma && delimiter === ",") throw new Error("a decimal comma needs a ';' or tab delimiter");
  return { ...d, delimiter, eol: d.crlf ? "\r\n" : "\n" };
}

function quote(s: string): string {
  return `"${s.replace(/"/g, '""')}"`;
}

function cellText(s: string, delimiter: string, always: boolean): string {
  return always || s.includes(delimiter) || s.includes('"') || /[\r\n]/.test(s) ? quote(s) : s;
}

/** Preamble, header and (optional) units row. */
export function exportHeaderText(channels: ChannelMeta[], metadata: Record<string, string>, dialect: ExportDialect): string {
  const d = resolve(dialect);
  let text = d.bom ? "\uFEFF" : "";
  if (d.preamble) {
    for (const [key, value] of Object.entries(metadata)) {
      text += d.preambleStyle === "colon"
        ? `${key}: ${value}${d.eol}`
        : `${cellText(key, d.delimiter, false)}${d.delimiter}${cellText(value, d.delimiter, false)}${d.eol}`;
    }
    text += d.eol;
  }
  const names = channels.map((c) => (d.unitsInHeader && c.unit ? `${c.name} [${c.unit}]` : c.name));
  text += names.map((n) => cellText(n, d.delimiter, !!d.quoteHeader)).join(d.delimiter) + d.eol;
  if (d.unitsRow) text += channels.map((c) => cellText(c.unit, d.delimiter, !!d.quoteHeader)).join(d.delimiter) + d.eol;
  return text;
}

/** Data rows as string chunks; NaN is written as an empty cell (a dropout). */
export function* exportRowsText(channels: ExportChannel[], dialect: ExportDialect, options: ExportOptions = {}): Generator<string> {
  const d = resolve(dialect);
  const rows = channels.length ? channels[0].values.length : 0;
  for (const c of channels) if (c.values.length !== rows) throw new Error(`channel ${c.name} has ${c.values.length} values, expected ${rows}`);
  const perChunk = options.rowsPerChunk ?? 4096;
  const last = channels.length - 1;
  for (let r0 = 0; r0 < rows; r0 += perChunk) {
    let out = "";
    const r1 = Math.min(rows, r0 + perChunk);
    for (let r = r0; r < r1; r++) {
      for (let j = 0; j <= last; j++) {
        const c = channels[j];
        const v = c.values[r];
        if (v === v) {
          const s = c.decimals === undefined ? String(v) : v.toFixed(c.decimals);
          out += d.decimalComma ? s.replace(".", ",") : s;
        }
        out += j === last ? d.eol : d.delimiter;
      }
    }
    yield out;
  }
}

/** A whole export: header text, then rows. */
export function* writeExport(
  channels: ExportChannel[],
  metadata: Record<string, string>,
  dialect: ExportDialect,
  options: ExportOptions = {},
): Generator<string> {
  yield exportHeaderText(channels, metadata, dialect);
  yield* exportRowsText(channels, dialect, options);
}

/** UTF-8 bytes of string chunks, for feeding a parser or a file stream. */
export function* encodeChunks(chunks: Iterable<string>): Generator<Uint8Array> {
  const encoder = new TextEncoder();
  for (const s of chunks) yield encoder.encode(s);
}

/**
 * Contracts shared by the engine's parts, the worker, the server and the CLI.
 *
 * Conventions (see DEVELOPERS.md, "Engine conventions"):
 * - SI inside the engine except where a name says otherwise: time s, speed m/s, accelerations m/s²,
 *   steering-wheel angle deg, damper travel mm (compression positive), ride height mm, yaw rate deg/s.
 * - Motion ratio MR = damper travel / wheel travel. Rates and bump-stop gaps are at the damper.
 * - NaN in a channel means a dropout (empty cell), never zero.
 */

/** Channels a Channel map can name. The first nine are required. */
export const REQUIRED_CHANNELS = [
  "time",
  "speed",
  "lat_accel",
  "long_accel",
  "steer",
  "damper_fl",
  "damper_fr",
  "damper_rl",
  "damper_rr",
] as const;
export const OPTIONAL_CHANNELS = ["ride_height_front", "ride_height_rear", "yaw_rate"] as const;
export const ALL_CHANNELS = [...REQUIRED_CHANNELS, ...OPTIONAL_CHANNELS] as const;
export type ChannelName = (typeof ALL_CHANNELS)[number];

export interface ChannelMapEntry {
  /** Column header exactly as in the file. */
  column: string;
  /** Unit of the logged values, e.g. "km/h", "g", "deg", "mm". */
  unit: string;
  /** Multiply by −1 after unit conversion (a channel logged with the other sign convention). */
  invert?: boolean;
}

/** MAP.json shape. */
export type ChannelMap = { [K in (typeof REQUIRED_CHANNELS)[number]]: ChannelMapEntry } & {
  [K in (typeof OPTIONAL_CHANNELS)[number]]?: ChannelMapEntry;
};

/** Per-axle spring data, CAR.json shape (rates and gap at the damper; gap from static). */
export interface AxleSpringInput {
  spring_rate_n_per_mm: number;
  motion_ratio: number;
  bump_stop?: BumpStopInput;
}

/**
 * A bump stop (packer): contact at `gap_mm` of damper travel from static, then a linear rate or,
 * when `force_table` is given, that force/deflection curve measured from contact (both at the
 * damper). With a table, `rate_n_per_mm` is its least-squares rate, kept for tools that read rates only.
 */
export interface BumpStopInput {
  gap_mm: number;
  rate_n_per_mm: number;
  force_table?: { deflection_mm: number; force_n: number }[];
}

/** CAR.json shape: what the CLI reads and the Garage exports. */
export interface CarInput {
  name: string;
  wheelbase_mm: number;
  mass_kg: number;
  static_front_weight_pct: number;
  cog_height_mm: number;
  steering_ratio: number;
  /** Centre of the fuel tank behind the front axle (mm); optional. */
  fuel_tank_from_front_axle_mm?: number;
  front: AxleSpringInput;
  rear: AxleSpringInput;
  static_damper_mm?: { fl: number; fr: number; rl: number; rr: number };
}

/** Field delimiters the parser detects. */
export type LogDelimiter = "," | ";" | "\t";

/** What the parser found at the top of a log export (from its first chunk). */
export interface LogHeader {
  /** Column headers exactly as in the file (quotes removed, surrounding spaces trimmed). */
  columns: string[];
  /** Unit per column from the units row or from the header text (`Speed [km/h]`), else null. */
  units: (string | null)[];
  /** Key/value lines the logger wrote before the header (session, date, car…). */
  metadata: Record<string, string>;
  delimiter: LogDelimiter;
  decimalComma: boolean;
  /** Columns whose cells are numbers (in file order). */
  numericColumns: string[];
  /** Columns with text cells; listed and never parsed. */
  skippedColumns: string[];
  /** The first text cell of each text column (at most 40 characters), to show what it holds. */
  textSamples: Record<string, string>;
  /** True when a units row sits under the header. */
  unitsRow: boolean;
  /** True when the file starts with a UTF-8 byte-order mark. */
  bom: boolean;
  /** "cr": lines end with a carriage return only (old Mac); "mixed": bare CRs beside LF or CRLF. Both are read as line ends. */
  lineEnding: "lf" | "crlf" | "cr" | "mixed";
  /** 1-based line number of the header in the file. */
  headerLine: number;
  /** Plain-language remarks for the mapping screen (duplicate names renamed, dialect found…). */
  notes: string[];
}

/**
 * One block of parsed rows. Arrays are in the engine's units (see top of file), invert applied,
 * NaN = dropout. Each array has exactly `rows` elements; they may be views of buffers reused for
 * the next block, so a consumer must copy anything it keeps.
 */
export interface ChannelBlock {
  rows: number;
  channels: { [K in ChannelName]?: Float64Array };
}

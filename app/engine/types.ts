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
  bump_stop?: { gap_mm: number; rate_n_per_mm: number };
}

/** CAR.json shape: what the CLI reads and the Garage exports. */
export interface CarInput {
  name: string;
  wheelbase_mm: number;
  mass_kg: number;
  static_front_weight_pct: number;
  cog_height_mm: number;
  steering_ratio: number;
  front: AxleSpringInput;
  rear: AxleSpringInput;
  static_damper_mm?: { fl: number; fr: number; rl: number; rr: number };
}

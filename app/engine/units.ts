/**
 * Units the ingest layer reads, per channel kind, and their factors to the engine's internal units
 * (see types.ts: s, m/s, m/s², deg of steering wheel, mm of damper travel, mm of ride height, deg/s).
 *
 * Factors follow NIST SP 811 (2008 edition): mph → m/s 0.44704, in → m 0.0254 (both exact by
 * definition), standard gravity 9.80665 m/s² (exact, CGPM 1901), km/h → m/s 1/3.6.
 * All conversions are pure scale factors, so the parser applies them with one multiply per cell.
 */
import type { ChannelName } from "./types";

export type ChannelKind =
  | "time"
  | "speed"
  | "acceleration"
  | "steer"
  | "damper"
  | "ride_height"
  | "yaw_rate";

export const CHANNEL_KIND: Record<ChannelName, ChannelKind> = {
  time: "time",
  speed: "speed",
  lat_accel: "acceleration",
  long_accel: "acceleration",
  steer: "steer",
  damper_fl: "damper",
  damper_fr: "damper",
  damper_rl: "damper",
  damper_rr: "damper",
  ride_height_front: "ride_height",
  ride_height_rear: "ride_height",
  yaw_rate: "yaw_rate",
};

export const STANDARD_GRAVITY_M_PER_S2 = 9.80665;
export const MPH_TO_M_PER_S = 0.44704;
export const INCH_TO_M = 0.0254;
/** km/h per m/s (exact: 3600 s / 1000 m). */
export const KMH_PER_M_PER_S = 3.6;
export const KMH_TO_M_PER_S = 1 / KMH_PER_M_PER_S;
const RAD_TO_DEG = 180 / Math.PI;

/** Canonical unit spelling → factor to the internal unit of that kind. */
const FACTORS: Record<ChannelKind, Record<string, number>> = {
  time: { s: 1, ms: 0.001 },
  speed: { "km/h": KMH_TO_M_PER_S, kph: KMH_TO_M_PER_S, mph: MPH_TO_M_PER_S, "m/s": 1 },
  acceleration: { g: STANDARD_GRAVITY_M_PER_S2, "m/s2": 1 },
  steer: { deg: 1, rad: RAD_TO_DEG },
  damper: { mm: 1, in: INCH_TO_M * 1000, m: 1000 },
  ride_height: { mm: 1, in: INCH_TO_M * 1000, m: 1000 },
  yaw_rate: { "deg/s": 1, "rad/s": RAD_TO_DEG },
};

/** Spellings loggers use for the same unit, mapped to the canonical one. */
const ALIASES: Record<string, string> = {
  sec: "s",
  secs: "s",
  second: "s",
  seconds: "s",
  msec: "ms",
  millisecond: "ms",
  milliseconds: "ms",
  kmh: "km/h",
  "km/hr": "km/h",
  "km h-1": "km/h",
  "m/sec": "m/s",
  "m s-1": "m/s",
  "m/s²": "m/s2",
  "m/s^2": "m/s2",
  "m/sec2": "m/s2",
  "m/sec^2": "m/s2",
  "m s-2": "m/s2",
  mps2: "m/s2",
  "°": "deg",
  degree: "deg",
  degrees: "deg",
  degs: "deg",
  radian: "rad",
  radians: "rad",
  inch: "in",
  inches: "in",
  '"': "in",
  "°/s": "deg/s",
  "deg/sec": "deg/s",
  "degrees/s": "deg/s",
  dps: "deg/s",
  "rad/sec": "rad/s",
};

/** Lower-cases and trims a unit as written in a file or map; returns the canonical spelling if known. */
export function canonicalUnit(raw: string): string {
  const u = raw.trim().replace(/^[[(]|[\])]$/g, "").trim().toLowerCase();
  return ALIASES[u] ?? u;
}

/** Canonical units Rakeline reads for a kind, for messages and pickers. */
export function allowedUnits(kind: ChannelKind): string[] {
  return Object.keys(FACTORS[kind]);
}

/** Factor from `unit` to the internal unit of `kind`, or null when the unit is not one we read for it. */
export function unitFactor(kind: ChannelKind, unit: string): number | null {
  const f = FACTORS[kind][canonicalUnit(unit)];
  return f === undefined ? null : f;
}

/** Which kinds accept this unit (used by the suggester to tell "unknown" from "wrong channel"). */
export function kindsForUnit(unit: string): ChannelKind[] {
  const u = canonicalUnit(unit);
  return (Object.keys(FACTORS) as ChannelKind[]).filter((k) => FACTORS[k][u] !== undefined);
}

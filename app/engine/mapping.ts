/**
 * Channel maps: proposing one from a file's header (for the mapping screen to confirm) and
 * validating one against the header before a parse.
 */
import { z } from "zod";
import { EngineError } from "./errors";
import { ALL_CHANNELS, REQUIRED_CHANNELS } from "./types";
import type { ChannelMap, ChannelMapEntry, ChannelName, LogHeader } from "./types";
import { CHANNEL_KIND, allowedUnits, canonicalUnit, unitFactor } from "./units";
import type { ChannelKind } from "./units";

const entrySchema = z
  .object({
    column: z.string().min(1, "column must name a column of the file"),
    unit: z.string().min(1, "unit must not be empty"),
    invert: z.boolean().optional(),
  })
  .strict();

/** The file's column names for a message: the first 30 and how many more (a 10 000-column file stays one readable line). */
const listColumns = (header: LogHeader) => {
  const shown = header.columns.slice(0, 30).map((c) => `"${c}"`).join(", ");
  return header.columns.length > 30 ? `${shown} and ${header.columns.length - 30} more` : shown;
};

/** Checks a map (parsed MAP.json or the mapping form) against the file's header. */
/** A clock time of day or lap clock: 1:23.4, 00:01:23.450, 12:05:09 (a point or comma before the fraction). */
const CLOCK_TIME = /^\d{1,2}:\d{2}(:\d{2})?([.,]\d+)?$/;

export function validateChannelMap(map: unknown, header: LogHeader): ChannelMap {
  if (typeof map !== "object" || map === null || Array.isArray(map)) {
    throw new EngineError("bad_map", "the channel map must be an object with one entry per channel, e.g. {\"time\": {\"column\": \"Time\", \"unit\": \"s\"}, …}");
  }
  const known = new Set<string>(ALL_CHANNELS);
  const unknown = Object.keys(map).filter((k) => !known.has(k));
  if (unknown.length) {
    throw new EngineError("bad_map", `the channel map names unknown channels: ${unknown.join(", ")}; channels are ${ALL_CHANNELS.join(", ")}`);
  }
  const record = map as Record<string, unknown>;
  const missing = REQUIRED_CHANNELS.filter((c) => record[c] === undefined);
  if (missing.length) {
    throw new EngineError("bad_map", `the channel map has no entry for ${missing.join(", ")} (required: ${REQUIRED_CHANNELS.join(", ")})`);
  }
  const out: Partial<Record<ChannelName, ChannelMapEntry>> = {};
  const usedBy = new Map<string, ChannelName>();
  for (const channel of ALL_CHANNELS) {
    if (record[channel] === undefined) continue;
    const parsed = entrySchema.safeParse(record[channel]);
    if (!parsed.success) {
      const issue = parsed.error.issues[0];
      const where = issue.path.length ? `${channel}.${issue.path.join(".")}` : channel;
      throw new EngineError("bad_map", `channel map entry ${where}: ${issue.message}`);
    }
    const entry = parsed.data;
    const kind = CHANNEL_KIND[channel];
    if (unitFactor(kind, entry.unit) === null) {
      throw new EngineError("unknown_unit", `unit "${entry.unit}" for ${channel} is not one Rakeline reads; use one of ${allowedUnits(kind).join(", ")}`);
    }
    if (!header.columns.includes(entry.column)) {
      throw new EngineError("column_missing", `column "${entry.column}" mapped to ${channel} is not in the file; its columns are ${listColumns(header)}`);
    }
    if (header.skippedColumns.includes(entry.column)) {
      const sample = header.textSamples?.[entry.column];
      const clock = channel === "time" && sample !== undefined && CLOCK_TIME.test(sample);
      const what = sample === undefined ? "" : ` (it reads "${sample}")`;
      const hint = clock ? "; clock times are not read: export the time as elapsed seconds or milliseconds" : "";
      throw new EngineError("column_not_numeric", `column "${entry.column}" mapped to ${channel} holds text, not numbers${what}${hint}; numeric columns are ${header.numericColumns.map((c) => `"${c}"`).join(", ")}`);
    }
    const other = usedBy.get(entry.column);
    if (other) {
      throw new EngineError("bad_map", `column "${entry.column}" is mapped to both ${other} and ${channel}; each channel needs its own column`);
    }
    usedBy.set(entry.column, channel);
    out[channel] = { column: entry.column, unit: canonicalUnit(entry.unit), ...(entry.invert ? { invert: true } : {}) };
  }
  return out as ChannelMap;
}

const DEFAULT_UNIT: Record<ChannelKind, string> = {
  time: "s",
  speed: "km/h",
  acceleration: "g",
  steer: "deg",
  damper: "mm",
  ride_height: "mm",
  yaw_rate: "deg/s",
};

/** Header text lower-cased, unit suffix dropped, separators as single spaces. */
export function normaliseName(name: string): string {
  return name
    .replace(/[[(][^\])]*[\])]\s*$/, "")
    // camelCase and run-together words: "SideAcc" → "side acc", "TravelFL" → "travel fl".
    .replace(/([a-z])([A-Z])/g, "$1 $2")
    .toLowerCase()
    .replace(/[_\-./:]+/g, " ")
    .replace(/([a-z])([0-9])/g, "$1 $2")
    .replace(/\s+/g, " ")
    .trim();
}

// Corner codes (FL or LF…), spelled out ("front left", "left front") or axle word plus side letter ("front l").
const CORNERS: [RegExp, "fl" | "fr" | "rl" | "rr"][] = [
  [/\b(fl|lf)\b|\bfront (left|l)\b|\b(left|l) front\b/, "fl"],
  [/\b(fr|rf)\b|\bfront (right|r)\b|\b(right|r) front\b/, "fr"],
  [/\b(rl|lr)\b|\brear (left|l)\b|\b(left|l) rear\b/, "rl"],
  [/\brr\b|\brear (right|r)\b|\b(right|r) rear\b/, "rr"],
];

function cornerOf(n: string): "fl" | "fr" | "rl" | "rr" | null {
  for (const [re, c] of CORNERS) if (re.test(n)) return c;
  return null;
}

const ACCEL_WORD = /\b(g|gs|acc|accel|acceleration|force)\b/;
/** Words for the two directions of acceleration (with ACCEL_WORD): across the car and along it. */
const LATERAL_WORD = /\b(lat|lateral|cross|across|side|sideways|transverse)\b/;
const LONGITUDINAL_WORD = /\b(long|lon|longitudinal|inline|along|forward|fwd|fore aft)\b/;

/** How strongly a normalised column name suggests a channel (0 = not at all). */
function nameScore(channel: ChannelName, n: string): number {
  switch (channel) {
    case "time":
      if (/\b(lap|date|delta|split|sector)\b/.test(n)) return 0;
      if (n === "time") return 100;
      if (/^(elapsed|session|log|run|logger|relative)( time| clock)?$|^(time|elapsed) (s|sec|secs|seconds|ms)$|^(time|elapsed|seconds) (since|from) (start|reset)$/.test(n)) return 90;
      if (/^timestamp|^time stamp/.test(n)) return 70;
      if (n === "t" || n === "seconds") return 60;
      return /\btime\b/.test(n) ? 30 : 0;
    case "speed":
      if (/\b(engine|rpm|fan|wind|shaft|pump|steer|steering|yaw)\b/.test(n)) return 0;
      if (/\bwheel\b/.test(n)) return 20;
      if (/^(speed|vehicle speed|car speed|ground speed|road speed|speed over ground|v car|vcar|v ground|v)$/.test(n)) return 100;
      if (/\bgps\b.*\b(speed|spd)\b|\b(speed|spd)\b.*\bgps\b/.test(n)) return 80;
      if (/\b(speed|spd|velocity)\b/.test(n)) return 60;
      return 0;
    case "lat_accel":
      if (/^(ay|a y|acc y|accel y|g y)$/.test(n)) return 80;
      return LATERAL_WORD.test(n) && ACCEL_WORD.test(n) ? 100 : /\blateral\b/.test(n) ? 60 : 0;
    case "long_accel":
      if (/^(ax|a x|acc x|accel x|g x)$/.test(n)) return 80;
      return LONGITUDINAL_WORD.test(n) && ACCEL_WORD.test(n) ? 100 : /\blongitudinal\b/.test(n) ? 60 : 0;
    case "steer":
      if (/\b(rate|speed|torque|velocity)\b/.test(n)) return 0;
      if (/\bsteer(ing)?\b|\bhand ?wheel\b/.test(n)) return 100;
      return n === "swa" ? 80 : 0;
    case "damper_fl":
    case "damper_fr":
    case "damper_rl":
    case "damper_rr": {
      if (!/\b(damper|dampers|damp|shock|susp|suspension|travel|stroke|pot|strut)\b/.test(n)) return 0;
      if (/\b(speed|velocity|vel|rate|force|temp|pressure)\b/.test(n)) return 0;
      return cornerOf(n) === channel.slice(7) ? 100 : 0;
    }
    case "ride_height_front":
    case "ride_height_rear": {
      if (!/\b(ride height|ride ht|rh|ride|clearance)\b/.test(n)) return 0;
      const front = /\b(front|f)\b/.test(n);
      const rear = /\b(rear|r)\b/.test(n);
      return (channel === "ride_height_front" ? front && !rear : rear && !front) ? 100 : 0;
    }
    case "yaw_rate":
      if (/\byaw ?rate\b|\byaw (velocity|vel)\b|\b(turn|heading) rate\b|\bgyro z\b/.test(n)) return 100;
      return /\byaw\b/.test(n) ? 60 : 0;
  }
}

/** Proposes a channel map from the header's names and units, with notes for the user to check. */
export function suggestChannelMap(header: LogHeader): { map: Partial<ChannelMap>; notes: string[] } {
  const candidates: { channel: ChannelName; col: number; score: number }[] = [];
  header.columns.forEach((name, col) => {
    if (!header.numericColumns.includes(name)) return;
    const n = normaliseName(name);
    const unit = header.units[col];
    for (const channel of ALL_CHANNELS) {
      let score = nameScore(channel, n);
      if (score === 0) continue;
      if (unit) score += unitFactor(CHANNEL_KIND[channel], unit) !== null ? 10 : -50;
      if (score > 0) candidates.push({ channel, col, score });
    }
  });
  candidates.sort((a, b) => b.score - a.score || a.col - b.col);
  const map: Partial<Record<ChannelName, ChannelMapEntry>> = {};
  const usedCols = new Set<number>();
  const notes: string[] = [];
  for (const { channel, col } of candidates) {
    if (map[channel] || usedCols.has(col)) continue;
    usedCols.add(col);
    const kind = CHANNEL_KIND[channel];
    const fileUnit = header.units[col];
    const column = header.columns[col];
    let unit = DEFAULT_UNIT[kind];
    if (fileUnit && unitFactor(kind, fileUnit) !== null) unit = canonicalUnit(fileUnit);
    else if (fileUnit) notes.push(`${channel}: "${column}" is in "${fileUnit}", which Rakeline cannot read for ${channel}; choose one of ${allowedUnits(kind).join(", ")}`);
    else notes.push(`${channel}: "${column}" has no unit in the file; ${unit} assumed — confirm`);
    map[channel] = { column, unit };
  }
  const missing = REQUIRED_CHANNELS.filter((c) => !map[c]);
  if (missing.length) notes.push(`no column found for ${missing.join(", ")}; choose them by hand`);
  notes.push("check each channel's sign convention (damper compression positive); set invert where the logger uses the other sign");
  return { map: map as Partial<ChannelMap>, notes };
}

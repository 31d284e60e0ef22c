/**
 * Demo scenario generator (`npm run demo:generate`): simulates stints of the fictional cars and
 * writes small logs in several export dialects to sample-data/logs/, with CAR.json, MAP.json and
 * truth.json beside each. `npm run demo:generate -- --large 300` also writes a ~300 MB export to
 * sample-data/large/ (git-ignored) for load tests.
 */
import { createWriteStream, mkdirSync, writeFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { DEFAULT_BAND_EDGES_KMH } from "../app/engine/bands";
import type { ChannelMap, ChannelName } from "../app/engine/types";
import { writeExport } from "./export-writer";
import type { ExportChannel, ExportDialect } from "./export-writer";
import { carFile, CLUB, COLDWATER_RIDGE, KESTREL_BANK, MARLIN_SR2, MARLIN_SR2_SPLITTER, VESPER_GT4R } from "./scenario";
import { simulateStint } from "./sim";
import type { SimCar, SimColumns, SimOptions } from "./sim";
import { Prng } from "./prng";
import type { TrackLayout } from "./track";

const HERE = dirname(fileURLToPath(import.meta.url));

/** How a simulated channel is written: column name, unit, factor from engine units, sign, decimals. */
interface ColumnSpec { channel: ChannelName; column: string; unit: string; factor: number; invert?: boolean; decimals: number }

export interface LogSpec {
  file: string;
  car: SimCar;
  carFile: string;
  withStatic: boolean;
  track: TrackLayout;
  laps: number;
  rateHz: number;
  seed: number;
  dialect: ExportDialect;
  columns: ColumnSpec[];
  /** Share of cells left empty in the listed channels, plus one longer gap. */
  dropouts?: { share: number; channels: ChannelName[]; gapChannel?: ChannelName; gapS?: number };
  metadata: Record<string, string>;
  /** Simulation extras: sensor noise levels and lap-to-lap pace (sim.ts SimOptions). */
  sim?: Partial<Omit<SimOptions, "laps" | "rateHz" | "seed" | "airDensityKgM3" | "bandEdgesKmh">>;
  /** Share of whole rows the logger failed to write (left out of the file, time jumping over them). */
  droppedRows?: number;
}

const mm = (channel: ChannelName, column: string, invert = false): ColumnSpec => ({ channel, column, unit: "mm", factor: 1, invert, decimals: 2 });
const inch = (channel: ChannelName, column: string): ColumnSpec => ({ channel, column, unit: "in", factor: 1 / 25.4, decimals: 4 });
const G = 9.80665;

/**
 * The demo logs. Column names are our own, one naming style per log as real exports differ (title case
 * with a units row; lower-case words with units in brackets; quoted title case; run-together CamelCase
 * with units in brackets); none follows any particular logger's convention.
 */
export const LOGS: LogSpec[] = [
  {
    file: "marlin-kestrel-comma.csv", car: MARLIN_SR2, carFile: "marlin-sr2.json", withStatic: true, track: KESTREL_BANK, laps: 4, rateHz: 100, seed: 11,
    dialect: { delimiter: ",", unitsRow: true, preamble: true },
    columns: [
      { channel: "time", column: "Elapsed", unit: "s", factor: 1, decimals: 3 },
      { channel: "speed", column: "Road Speed", unit: "km/h", factor: 3.6, decimals: 2 },
      { channel: "lat_accel", column: "Lateral Acceleration", unit: "g", factor: 1 / G, decimals: 3 },
      { channel: "long_accel", column: "Longitudinal Acceleration", unit: "g", factor: 1 / G, decimals: 3 },
      { channel: "steer", column: "Handwheel Angle", unit: "deg", factor: 1, decimals: 2 },
      mm("damper_fl", "Travel Front Left"), mm("damper_fr", "Travel Front Right"), mm("damper_rl", "Travel Rear Left"), mm("damper_rr", "Travel Rear Right"),
    ],
    metadata: { Club: CLUB, Venue: KESTREL_BANK.name, Car: MARLIN_SR2.name, Session: "Practice 2", Driver: "demo driver", Fuel: "40 L at start" },
  },
  {
    file: "marlin-kestrel-semicolon.csv", car: MARLIN_SR2, carFile: "marlin-sr2-no-static.json", withStatic: false, track: KESTREL_BANK, laps: 4, rateHz: 50, seed: 12,
    dialect: { delimiter: ";", decimalComma: true, preamble: true, preambleStyle: "colon", unitsInHeader: true },
    columns: [
      { channel: "time", column: "run clock", unit: "ms", factor: 1000, decimals: 0 },
      { channel: "speed", column: "speed over ground", unit: "mph", factor: 1 / 0.44704, decimals: 3 },
      { channel: "lat_accel", column: "accel across", unit: "m/s2", factor: 1, decimals: 3 },
      { channel: "long_accel", column: "accel along", unit: "m/s2", factor: 1, decimals: 3 },
      { channel: "steer", column: "steer input", unit: "deg", factor: 1, invert: true, decimals: 2 },
      inch("damper_fl", "strut lf"), inch("damper_fr", "strut rf"), inch("damper_rl", "strut lr"), inch("damper_rr", "strut rr"),
      { channel: "ride_height_front", column: "clearance front", unit: "mm", factor: 1, decimals: 1 },
      { channel: "ride_height_rear", column: "clearance rear", unit: "mm", factor: 1, decimals: 1 },
      { channel: "yaw_rate", column: "turn rate", unit: "deg/s", factor: 1, decimals: 2 },
    ],
    dropouts: { share: 0.002, channels: ["damper_fl", "damper_rr", "ride_height_front", "lat_accel"], gapChannel: "damper_rr", gapS: 0.4 },
    metadata: { Club: CLUB, Venue: KESTREL_BANK.name, Car: MARLIN_SR2.name, Session: "Race 1", Logger: "demo logger, 50 Hz" },
  },
  {
    file: "vesper-kestrel-tab.csv", car: VESPER_GT4R, carFile: "vesper-gt4r.json", withStatic: false, track: KESTREL_BANK, laps: 4, rateHz: 50, seed: 21,
    dialect: { delimiter: "\t", unitsRow: true, quoteHeader: true, crlf: true, bom: true },
    columns: [
      { channel: "time", column: "Time Since Start", unit: "s", factor: 1, decimals: 3 },
      { channel: "speed", column: "Car Speed", unit: "m/s", factor: 1, decimals: 3 },
      { channel: "lat_accel", column: "Cross Accel", unit: "g", factor: 1 / G, decimals: 3 },
      { channel: "long_accel", column: "Forward Accel", unit: "g", factor: 1 / G, invert: true, decimals: 3 },
      { channel: "steer", column: "Steering Position", unit: "deg", factor: 1, decimals: 2 },
      mm("damper_fl", "Stroke Front L"), mm("damper_fr", "Stroke Front R"), mm("damper_rl", "Stroke Rear L", true), mm("damper_rr", "Stroke Rear R", true),
    ],
    dropouts: { share: 0.001, channels: ["speed", "damper_fr"] },
    metadata: {},
  },
  {
    file: "vesper-coldwater-comma.csv", car: VESPER_GT4R, carFile: "vesper-gt4r.json", withStatic: false, track: COLDWATER_RIDGE, laps: 1, rateHz: 100, seed: 31,
    dialect: { delimiter: ",", preamble: true, unitsInHeader: true },
    columns: [
      { channel: "time", column: "RunTime", unit: "s", factor: 1, decimals: 3 },
      { channel: "speed", column: "RoadSpd", unit: "km/h", factor: 3.6, decimals: 2 },
      { channel: "lat_accel", column: "SideAcc", unit: "g", factor: 1 / G, decimals: 3 },
      { channel: "long_accel", column: "FwdAcc", unit: "g", factor: 1 / G, decimals: 3 },
      { channel: "steer", column: "SteerPos", unit: "deg", factor: 1, decimals: 2 },
      mm("damper_fl", "TravelFL"), mm("damper_fr", "TravelFR"), mm("damper_rl", "TravelRL"), mm("damper_rr", "TravelRR"),
    ],
    metadata: { Club: CLUB, Venue: COLDWATER_RIDGE.name, Car: VESPER_GT4R.name, Session: "Timed run 1" },
  },
  {
    // The low splitter: balance moving forward with speed. Sensor noise as on a real 200 Hz logger
    // (≈0.015 g on lateral acceleration, ≈0.35° at the steering wheel), lap speeds varying ±1 % and
    // rising 3 % over the stint; written at 50 Hz to keep the committed file small.
    file: "marlin-kestrel-splitter.csv", car: MARLIN_SR2_SPLITTER, carFile: "marlin-sr2.json", withStatic: true, track: KESTREL_BANK, laps: 4, rateHz: 50, seed: 41,
    dialect: { delimiter: ",", unitsRow: true, preamble: true },
    columns: [
      { channel: "time", column: "Elapsed", unit: "s", factor: 1, decimals: 3 },
      { channel: "speed", column: "Road Speed", unit: "km/h", factor: 3.6, decimals: 2 },
      { channel: "lat_accel", column: "Lateral Acceleration", unit: "g", factor: 1 / G, decimals: 3 },
      { channel: "long_accel", column: "Longitudinal Acceleration", unit: "g", factor: 1 / G, decimals: 3 },
      { channel: "steer", column: "Handwheel Angle", unit: "deg", factor: 1, decimals: 2 },
      mm("damper_fl", "Travel Front Left"), mm("damper_fr", "Travel Front Right"), mm("damper_rl", "Travel Rear Left"), mm("damper_rr", "Travel Rear Right"),
    ],
    metadata: { Club: CLUB, Venue: KESTREL_BANK.name, Car: MARLIN_SR2.name, Session: "Practice 3 (low splitter)", Fuel: "40 L at start" },
    sim: { latNoiseMs2: 0.015 * G, steerNoiseDeg: 0.35, paceSpread: 0.01, paceDrift: 0.03 },
  },
];

/** The map file matching a log spec (units and inverts as the file has them). */
export function mapFor(spec: LogSpec): ChannelMap {
  const map: Record<string, { column: string; unit: string; invert?: boolean }> = {};
  for (const c of spec.columns) {
    const shown = spec.dialect.unitsInHeader ? `${c.column} [${c.unit}]` : c.column;
    map[c.channel] = { column: shown, unit: c.unit, ...(c.invert ? { invert: true } : {}) };
  }
  return map as unknown as ChannelMap;
}

/** Export columns from simulated ones: unit conversion, sign, dropouts. */
export function exportColumns(spec: LogSpec, cols: SimColumns, timeOffsetS = 0): ExportChannel[] {
  const rng = new Prng(spec.seed * 7919 + Math.round(timeOffsetS));
  // Rows the logger did not write: one draw per row from its own generator (the cells' draws stay as they were).
  let keep: number[] | null = null;
  if (spec.droppedRows) {
    const rowRng = new Prng(spec.seed * 104729 + 17);
    keep = [];
    for (let i = 0; i < cols.time.length; i++) if (!(rowRng.next() < spec.droppedRows)) keep.push(i);
  }
  return spec.columns.map((c) => {
    const all = cols[c.channel as keyof SimColumns];
    const src = keep ? Float64Array.from(keep, (i) => all[i]) : all;
    const k = c.factor * (c.invert ? -1 : 1);
    const values = Float64Array.from(src, (v) => (c.channel === "time" ? (v + timeOffsetS) * k : v * k));
    const d = spec.dropouts;
    if (d && d.channels.includes(c.channel)) for (let i = 0; i < values.length; i++) if (rng.next() < d.share) values[i] = NaN;
    if (d && d.gapChannel === c.channel && d.gapS) {
      const from = Math.floor(values.length * 0.37), len = Math.round(d.gapS * spec.rateHz);
      values.fill(NaN, from, from + len);
    }
    return { name: c.column, unit: c.unit, values, decimals: c.decimals };
  });
}

function writeChunks(path: string, chunks: Iterable<string>): Promise<void> {
  return new Promise((resolve, reject) => {
    const out = createWriteStream(path);
    out.on("error", reject);
    const it = chunks[Symbol.iterator]();
    const pump = () => {
      for (;;) {
        const r = it.next();
        if (r.done) { out.end(resolve); return; }
        if (!out.write(r.value)) { out.once("drain", pump); return; }
      }
    };
    pump();
  });
}

export function simulate(spec: LogSpec) {
  return simulateStint(spec.car, spec.track, { laps: spec.laps, rateHz: spec.rateHz, seed: spec.seed, airDensityKgM3: 1.225, bandEdgesKmh: [...DEFAULT_BAND_EDGES_KMH], ...spec.sim });
}

async function main(): Promise<void> {
  const args = process.argv.slice(2);
  const logsDir = join(HERE, "logs");
  const carsDir = join(HERE, "cars");
  mkdirSync(logsDir, { recursive: true });
  mkdirSync(carsDir, { recursive: true });
  for (const spec of LOGS) {
    const { columns, truth } = simulate(spec);
    const base = spec.file.replace(/\.csv$/, "");
    await writeChunks(join(logsDir, spec.file), writeExport(exportColumns(spec, columns), spec.metadata, spec.dialect));
    writeFileSync(join(carsDir, spec.carFile), JSON.stringify(carFile(spec.car, spec.withStatic), null, 2) + "\n");
    writeFileSync(join(logsDir, `${base}.map.json`), JSON.stringify(mapFor(spec), null, 2) + "\n");
    writeFileSync(join(logsDir, `${base}.truth.json`), JSON.stringify({ car_file: `../cars/${spec.carFile}`, ...truth }, null, 2) + "\n");
    console.log(`${spec.file}: ${columns.time.length} rows, ${(columns.time[columns.time.length - 1]).toFixed(1)} s`);
  }
  const li = args.indexOf("--large");
  if (li >= 0) {
    const targetMb = Number(args[li + 1] ?? 300);
    if (!(targetMb > 0 && targetMb <= 2000)) throw new Error("--large takes a size in MB from 1 to 2000");
    const spec = { ...LOGS[0], laps: 20 };
    const { columns } = simulate(spec);
    const dir = join(HERE, "large");
    mkdirSync(dir, { recursive: true });
    const path = join(dir, `marlin-kestrel-${targetMb}mb.csv`);
    const stintS = columns.time[columns.time.length - 1] + 1 / spec.rateHz;
    let written = 0;
    // Back-to-back copies of one 20-lap stint (new dropout draws each time) until the size is reached.
    function* chunks(): Generator<string> {
      let k = 0;
      for (const s of writeExport(exportColumns(spec, columns), spec.metadata, spec.dialect)) { written += s.length; yield s; }
      while (written < targetMb * 1e6) {
        k++;
        const gen = writeExport(exportColumns(spec, columns, k * stintS), {}, spec.dialect);
        gen.next(); // header only once
        for (const s of gen) { written += s.length; yield s; if (written >= targetMb * 1e6) return; }
      }
    }
    await writeChunks(path, chunks());
    writeFileSync(join(dir, "marlin-kestrel-large.map.json"), JSON.stringify(mapFor(spec), null, 2) + "\n");
    console.log(`${path}: ${(written / 1e6).toFixed(0)} MB (car file: sample-data/cars/${spec.carFile})`);
  }
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  main().catch((e) => {
    console.error(`error: ${e instanceof Error ? e.message : String(e)}`);
    process.exitCode = 1;
  });
}

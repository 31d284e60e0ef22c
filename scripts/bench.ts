/**
 * npm run bench [-- --mb 500 --cli-mb 300 --regenerate]
 *
 * Generates (once, into sample-data/large/, git-ignored) a 20-channel export of the demo car on the
 * demo circuit, then measures in separate child processes, so each peak RSS is its own:
 *   engine parse only, engine parse + full summary, papaparse and uDSV parsing the same file into
 *   Float64Array column blocks, and the analyse CLI as a whole process on a smaller export against
 *   uDSV's parse alone. Prints MB/s, peak RSS and the ratio against uDSV.
 */
import { spawnSync } from "node:child_process";
import { closeSync, createReadStream, existsSync, mkdirSync, openSync, readFileSync, statSync, writeFileSync, writeSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { exportHeaderText, exportRowsText } from "../sample-data/export-writer";
import type { ExportChannel } from "../sample-data/export-writer";
import type { CarInput, ChannelMap } from "../app/engine/types";

const ROOT = fileURLToPath(new URL("..", import.meta.url));
const LARGE = `${ROOT}sample-data/large/`;
const SELF = fileURLToPath(import.meta.url);
const BLOCK_ROWS = 16384;
const CHANNELS = 20;

const CAR: CarInput = {
  name: "Marlin SR2 (bench)",
  wheelbase_mm: 2450,
  mass_kg: 640,
  static_front_weight_pct: 42,
  cog_height_mm: 300,
  steering_ratio: 11,
  front: { spring_rate_n_per_mm: 90, motion_ratio: 0.9, bump_stop: { gap_mm: 22, rate_n_per_mm: 600 } },
  rear: { spring_rate_n_per_mm: 110, motion_ratio: 0.85 },
};

const MAP: ChannelMap = {
  time: { column: "Elapsed Time", unit: "s" },
  speed: { column: "Ground Speed", unit: "km/h" },
  lat_accel: { column: "G Lateral", unit: "g" },
  long_accel: { column: "G Longitudinal", unit: "g" },
  steer: { column: "Steering Wheel Angle", unit: "deg" },
  damper_fl: { column: "Damper Pos FL", unit: "mm" },
  damper_fr: { column: "Damper Pos FR", unit: "mm" },
  damper_rl: { column: "Damper Pos RL", unit: "mm" },
  damper_rr: { column: "Damper Pos RR", unit: "mm" },
  ride_height_front: { column: "Ride Height Front", unit: "mm" },
  ride_height_rear: { column: "Ride Height Rear", unit: "mm" },
  yaw_rate: { column: "Yaw Rate", unit: "deg/s" },
};

const COLUMNS: [string, string, number][] = [
  ["Elapsed Time", "s", 3], ["Ground Speed", "km/h", 2], ["G Lateral", "g", 3], ["G Longitudinal", "g", 3],
  ["Steering Wheel Angle", "deg", 1], ["Damper Pos FL", "mm", 2], ["Damper Pos FR", "mm", 2],
  ["Damper Pos RL", "mm", 2], ["Damper Pos RR", "mm", 2], ["Ride Height Front", "mm", 1],
  ["Ride Height Rear", "mm", 1], ["Yaw Rate", "deg/s", 2], ["Engine Speed", "rpm", 0], ["Throttle", "%", 1],
  ["Brake Pressure Front", "bar", 2], ["Brake Pressure Rear", "bar", 2], ["Gear", "", 0],
  ["Oil Temp", "degC", 1], ["Water Temp", "degC", 1], ["Fuel Level", "l", 2],
];

/** Own signal model: a 3.1 km lap of straights and constant-radius corners, driven at 100 Hz. */
function lapSpeedProfile(): { speed: Float64Array; curvature: Float64Array } {
  const lap = 3100;
  const corners = [[300, 120, 45, 1], [700, 90, 25, -1], [1150, 200, 110, 1], [1600, 80, 35, 1], [2050, 150, 70, -1], [2600, 110, 30, 1]];
  const curvature = new Float64Array(lap);
  for (const [at, len, r, dir] of corners) for (let s = at; s < at + len; s++) curvature[s] = dir / r;
  const speed = new Float64Array(lap);
  for (let s = 0; s < lap; s++) speed[s] = curvature[s] ? Math.min(62, Math.sqrt((1.6 * 9.81) / Math.abs(curvature[s]))) : 62;
  for (let pass = 0; pass < 2; pass++) {
    for (let s = 1; s < lap; s++) speed[s] = Math.min(speed[s], Math.sqrt(speed[s - 1] ** 2 + 2 * 5 * 1)); // traction
    for (let s = lap - 2; s >= 0; s--) speed[s] = Math.min(speed[s], Math.sqrt(speed[s + 1] ** 2 + 2 * 14 * 1)); // braking
  }
  return { speed, curvature };
}

function generate(path: string, targetBytes: number): void {
  const { speed, curvature } = lapSpeedProfile();
  const fd = openSync(path, "w");
  const header = exportHeaderText(COLUMNS.map(([name, unit]) => ({ name, unit })), {}, {});
  writeSync(fd, header);
  let written = header.length;
  const block: ExportChannel[] = COLUMNS.map(([name, unit, decimals]) => ({ name, unit, decimals, values: new Float64Array(BLOCK_ROWS) }));
  let s = 0;
  let t = 0;
  let vPrev = speed[0];
  let seed = 12345;
  const noise = () => ((seed = (seed * 1103515245 + 12345) >>> 0) / 2 ** 32 - 0.5);
  while (written < targetBytes) {
    for (let i = 0; i < BLOCK_ROWS; i++) {
      const k = Math.floor(s) % speed.length;
      const v = speed[k];
      const ay = v * v * curvature[k];
      const ax = (v - vPrev) / 0.01;
      vPrev = v;
      const aeroF = 0.5 * 1.2 * 1.1 * v * v;
      const aeroR = 0.5 * 1.2 * 1.5 * v * v;
      const roll = ay * 0.9;
      const pitch = ax * 0.6;
      const vals = [t, v * 3.6, ay / 9.80665, ax / 9.80665, (11 * 57.3 * 2.45 * curvature[k] + 0.8 * ay / 9.81) * 1.0,
        25 + aeroF / 180 + roll - pitch, 25 + aeroF / 180 - roll - pitch, 28 + aeroR / 200 + roll + pitch, 28 + aeroR / 200 - roll + pitch,
        45 - aeroF / 150, 60 - aeroR / 170, (v * curvature[k] * 180) / Math.PI, 3000 + v * 130, ax > 0 ? 100 : 20,
        ax < 0 ? -ax * 6 : 0, ax < 0 ? -ax * 4 : 0, 1 + Math.min(5, Math.floor(v / 12)), 105 + 5 * Math.sin(t / 60), 88, 60 - t / 60];
      for (let j = 0; j < CHANNELS; j++) block[j].values[i] = vals[j] + (j > 0 && j < 12 ? noise() * 0.02 : 0);
      s += v * 0.01;
      t += 0.01;
    }
    for (const text of exportRowsText(block, {})) {
      writeSync(fd, text);
      written += text.length;
    }
  }
  closeSync(fd);
}

function ensureFile(mb: number, regenerate: boolean): string {
  mkdirSync(LARGE, { recursive: true });
  const path = `${LARGE}bench-${mb}mb.csv`;
  if (regenerate || !existsSync(path) || statSync(path).size < mb * 1e6) {
    const t0 = performance.now();
    process.stdout.write(`generating ${path} … `);
    generate(path, mb * 1e6);
    process.stdout.write(`${((performance.now() - t0) / 1000).toFixed(1)} s\n`);
  }
  writeFileSync(`${LARGE}bench-car.json`, JSON.stringify(CAR, null, 2));
  writeFileSync(`${LARGE}bench-map.json`, JSON.stringify(MAP, null, 2));
  return path;
}

/** Fixed-size column blocks, filled row by row the way a streaming consumer would (and then dropped). */
function columnSink(columns: number) {
  const cols = Array.from({ length: columns }, () => new Float64Array(BLOCK_ROWS));
  let at = 0;
  let rows = 0;
  return {
    row(values: ArrayLike<unknown>, convert: boolean) {
      for (let j = 0; j < columns; j++) cols[j][at] = convert ? Number(values[j]) : (values[j] as number);
      rows++;
      if (++at === BLOCK_ROWS) at = 0;
    },
    get rows() {
      return rows;
    },
  };
}

async function child(kind: string, path: string): Promise<void> {
  const t0 = performance.now();
  let rows = 0;
  const stream = () => createReadStream(path, { highWaterMark: 1 << 20 });
  if (kind === "engine-parse") {
    const { ingestLog } = await import("../app/engine/ingest");
    rows = (await ingestLog(stream(), MAP, { onBlock: () => {} })).rows;
  } else if (kind === "engine-summary") {
    const { analyseLog } = await import("../app/engine/analyse");
    rows = (await analyseLog(stream(), CAR, MAP)).samples;
  } else if (kind === "papaparse") {
    const Papa = (await import("papaparse")).default;
    const sink = columnSink(CHANNELS);
    let first = true;
    await new Promise<void>((resolve, reject) =>
      Papa.parse(stream() as never, {
        chunk: (res: { data: string[][] }) => {
          for (const r of res.data) if (first) first = false; else if (r.length === CHANNELS) sink.row(r, true);
        },
        complete: () => resolve(),
        error: reject,
      }),
    );
    rows = sink.rows;
  } else if (kind === "udsv") {
    const { inferSchema, initParser } = await import("udsv");
    const sink = columnSink(CHANNELS);
    let parser: ReturnType<typeof initParser> | null = null;
    const onRow = (r: number[]) => sink.row(r, false);
    for await (const chunk of stream()) {
      const text = chunk.toString();
      parser ??= initParser(inferSchema(text));
      parser.chunk(text, parser.typedArrs as never, onRow as never);
    }
    parser?.end();
    rows = sink.rows;
  } else throw new Error(`unknown bench child ${kind}`);
  const seconds = (performance.now() - t0) / 1000;
  process.stdout.write(JSON.stringify({ seconds, rows, maxRssMb: process.resourceUsage().maxRSS / 1024 }) + "\n");
}

interface Measure {
  label: string;
  seconds: number;
  maxRssMb: number;
  mb: number;
  note?: string;
}

function runChild(kind: string, path: string): Measure {
  const r = spawnSync(process.execPath, ["--import", "tsx", SELF, "--child", kind, path], { cwd: ROOT, encoding: "utf8", maxBuffer: 1 << 24 });
  if (r.status !== 0) throw new Error(`${kind} failed: ${r.stderr.trim().split("\n").slice(-3).join(" | ")}`);
  const m = JSON.parse(r.stdout.trim().split("\n").pop()!);
  return { label: kind, seconds: m.seconds, maxRssMb: m.maxRssMb, mb: statSync(path).size / 1e6 };
}

/** The CLI as users run it; peak RSS is read at exit by a preloaded hook. */
function runCli(path: string): Measure {
  const rssFile = `${LARGE}cli-rss.json`;
  const hookCode = `import fs from "node:fs";process.on("exit",()=>fs.writeFileSync(${JSON.stringify(rssFile)},String(process.resourceUsage().maxRSS)))`;
  const hook = `data:text/javascript,${encodeURIComponent(hookCode)}`;
  const t0 = performance.now();
  const r = spawnSync(process.execPath, ["--import", hook, "--import", "tsx", `${ROOT}scripts/analyse.ts`, path, "--car", `${LARGE}bench-car.json`, "--map", `${LARGE}bench-map.json`], { cwd: ROOT, encoding: "utf8", maxBuffer: 1 << 26 });
  const seconds = (performance.now() - t0) / 1000;
  if (r.status !== 0) throw new Error(`CLI failed (exit ${r.status}): ${r.stderr.trim().slice(0, 300)}`);
  JSON.parse(r.stdout);
  return { label: "CLI, whole process", seconds, maxRssMb: Number(readFileSync(rssFile, "utf8")) / 1024, mb: statSync(path).size / 1e6 };
}

function table(rows: Measure[], reference: Measure): string {
  const line = (c: string[]) => c.map((x, i) => (i === 0 ? x.padEnd(34) : x.padStart(11))).join("");
  const out = [line(["run", "MB", "seconds", "MB/s", "peak MB", "× uDSV"])];
  for (const m of rows) {
    const rate = m.mb / m.seconds;
    out.push(line([m.label, m.mb.toFixed(0), m.seconds.toFixed(2), rate.toFixed(0), m.maxRssMb.toFixed(0), (rate / (reference.mb / reference.seconds)).toFixed(2)]) + (m.note ? `  ${m.note}` : ""));
  }
  return out.join("\n");
}

async function main(): Promise<void> {
  const args = process.argv.slice(2);
  if (args[0] === "--child") return child(args[1], args[2]);
  const flag = (name: string, dflt: number) => {
    const i = args.indexOf(name);
    return i >= 0 ? Number(args[i + 1]) : dflt;
  };
  const regenerate = args.includes("--regenerate");
  const big = ensureFile(flag("--mb", 500), regenerate);
  const mid = ensureFile(flag("--cli-mb", 300), regenerate);
  const haveSummary = existsSync(`${ROOT}app/engine/analyse.ts`);
  console.log(`\n${CHANNELS}-channel export, ${(statSync(big).size / 1e6).toFixed(0)} MB; each run in its own process (2 shared cores: figures vary with load)\n`);
  const udsv = runChild("udsv", big);
  const runs: Measure[] = [{ ...runChild("engine-parse", big), label: "engine: parse only" }];
  if (haveSummary) runs.push({ ...runChild("engine-summary", big), label: "engine: parse + full summary", note: "target ≥ 350 MB/s" });
  else runs.push({ ...runs[0], label: "engine: parse only (no summary yet)" });
  runs.push({ ...runChild("papaparse", big), label: "papaparse → Float64Array blocks" }, { ...udsv, label: "uDSV → Float64Array blocks" });
  console.log(table(runs, udsv));

  console.log(`\nCLI on a ${(statSync(mid).size / 1e6).toFixed(0)} MB export against uDSV's parse alone (targets: ≥ 2× uDSV, peak < 400 MB)\n`);
  const udsvMid = { ...runChild("udsv", mid), label: "uDSV parse alone" };
  const cli = existsSync(`${ROOT}scripts/analyse.ts`) ? runCli(mid) : null;
  console.log(table(cli ? [cli, udsvMid] : [udsvMid], udsvMid));
  if (!cli) console.log("(scripts/analyse.ts not present yet: CLI not measured)");
}

await main();

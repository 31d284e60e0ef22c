/**
 * analyse CLI (batch users depend on this contract):
 *   npm run --silent analyse -- FILE --car CAR.json --map MAP.json [--bands 0,80,120,160,260]
 *                                [--air-temp-c 20 --air-pressure-hpa 1013.25 [--humidity-pct 50]]
 *                                [--fuel-start-kg 45 --fuel-end-kg 18] [--threads N]
 * --fuel-start-kg/--fuel-end-kg (both or neither): the fuel at the start and the end of the log; the
 * burn is taken as linear in time and split over the axles by the car file's
 * fuel_tank_from_front_axle_mm, and the static-load drift is then not fitted.
 * Large files are analysed in parts on worker threads (one per core by default; --threads 1 for
 * one thread); the output is the same either way (see app/engine/split.ts and filters.ts).
 * Prints one JSON object (the session summary without its chart traces) on stdout and exits 0.
 * Any bad input: exit 2, exactly one line `error: …` on stderr, nothing on stdout.
 */
import { readFileSync, statSync } from "node:fs";
import { parseBandEdges } from "../app/engine/bands";
import { validateCar } from "../app/engine/car";
import { isEngineError } from "../app/engine/errors";
import { validateFuel } from "../app/engine/fuel";
import type { ChannelMap } from "../app/engine/types";
import { analyseFileInParts, defaultThreads } from "./lib/part-threads";

class UsageError extends Error {}

const USAGE = "usage: analyse FILE --car CAR.json --map MAP.json [--bands 0,80,120,160,260] [--air-temp-c 20] [--air-pressure-hpa 1013.25] [--humidity-pct 50] [--fuel-start-kg 45 --fuel-end-kg 18] [--threads N]";
const VALUE_FLAGS = ["--car", "--map", "--bands", "--air-temp-c", "--air-pressure-hpa", "--humidity-pct", "--fuel-start-kg", "--fuel-end-kg", "--threads"] as const;
type Flag = (typeof VALUE_FLAGS)[number];

function parseArgs(argv: string[]): { file: string; flags: Partial<Record<Flag, string>> } {
  const flags: Partial<Record<Flag, string>> = {};
  const files: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (arg === "--") continue;
    if (arg.startsWith("--")) {
      const eq = arg.indexOf("=");
      const name = (eq > 0 ? arg.slice(0, eq) : arg) as Flag;
      if (!VALUE_FLAGS.includes(name)) throw new UsageError(`unknown option ${arg.slice(0, 60)}; ${USAGE}`);
      const value = eq > 0 ? arg.slice(eq + 1) : argv[++i];
      if (value === undefined || value === "") throw new UsageError(`${name} needs a value; ${USAGE}`);
      if (flags[name] !== undefined) throw new UsageError(`${name} is given twice`);
      flags[name] = value;
    } else files.push(arg);
  }
  if (files.length === 0) throw new UsageError(`no log file given; ${USAGE}`);
  if (files.length > 1) throw new UsageError(`one log file at a time (got ${files.length}: ${files.slice(0, 3).join(", ")})`);
  if (!flags["--car"]) throw new UsageError(`--car CAR.json is required; ${USAGE}`);
  if (!flags["--map"]) throw new UsageError(`--map MAP.json is required; ${USAGE}`);
  return { file: files[0], flags };
}

/** A car file or channel map is a few kB; anything past this is not one (a device, a log given by mistake). */
const JSON_FILE_MAX_BYTES = 1 << 20;

function readJson(path: string, what: string): unknown {
  let text: string;
  try {
    // Only a regular file of sensible size: /dev/zero would grow without end, a FIFO would block.
    const st = statSync(path);
    if (!st.isFile()) throw new UsageError(`the ${what} ${path} is not a regular file`);
    if (st.size > JSON_FILE_MAX_BYTES) throw new UsageError(`the ${what} ${path} is ${(st.size / 1e6).toFixed(1)} MB; a ${what} is a small JSON file (at most 1 MB)`);
    text = readFileSync(path, "utf8");
  } catch (e) {
    if (e instanceof UsageError) throw e;
    throw new UsageError(`cannot read the ${what} ${path}: ${(e as NodeJS.ErrnoException).code === "ENOENT" ? "no such file" : (e as Error).message}`);
  }
  try {
    return JSON.parse(text.replace(/^\uFEFF/, ""));
  } catch (e) {
    throw new UsageError(`the ${what} ${path} is not valid JSON: ${(e as Error).message}`);
  }
}

function numberFlag(value: string | undefined, name: string): number | undefined {
  if (value === undefined) return undefined;
  const n = Number(value.trim().replace(",", "."));
  if (value.trim() === "" || !Number.isFinite(n)) throw new UsageError(`${name} must be a number, got "${value}"`);
  return n;
}

async function main(): Promise<void> {
  const { file, flags } = parseArgs(process.argv.slice(2));
  const car = validateCar(readJson(flags["--car"]!, "car file"));
  const mapJson = readJson(flags["--map"]!, "channel map");
  if (typeof mapJson !== "object" || mapJson === null || Array.isArray(mapJson)) throw new UsageError(`the channel map ${flags["--map"]} must be a JSON object`);
  const bandEdgesKmh = flags["--bands"] !== undefined ? parseBandEdges(flags["--bands"]) : undefined;
  const airTempC = numberFlag(flags["--air-temp-c"], "--air-temp-c");
  const airPressureHpa = numberFlag(flags["--air-pressure-hpa"], "--air-pressure-hpa");
  const airHumidityPct = numberFlag(flags["--humidity-pct"], "--humidity-pct");
  const fuelStart = numberFlag(flags["--fuel-start-kg"], "--fuel-start-kg");
  const fuelEnd = numberFlag(flags["--fuel-end-kg"], "--fuel-end-kg");
  if ((fuelStart === undefined) !== (fuelEnd === undefined)) throw new UsageError(`give both --fuel-start-kg and --fuel-end-kg, or neither (got only ${fuelStart === undefined ? "--fuel-end-kg" : "--fuel-start-kg"})`);
  const fuel = fuelStart !== undefined && fuelEnd !== undefined ? validateFuel({ startKg: fuelStart, endKg: fuelEnd }) : undefined;
  let stat;
  try {
    stat = statSync(file);
  } catch (e) {
    throw new UsageError(`cannot read the log file ${file}: ${(e as NodeJS.ErrnoException).code === "ENOENT" ? "no such file" : (e as Error).message}`);
  }
  if (!stat.isFile()) throw new UsageError(`the log file ${file} is not a regular file`);
  const threads = numberFlag(flags["--threads"], "--threads") ?? defaultThreads();
  if (!Number.isInteger(threads) || threads < 1 || threads > 64) throw new UsageError(`--threads must be a whole number from 1 to 64, got "${flags["--threads"]}"`);
  const summary = await analyseFileInParts(file, car, mapJson as ChannelMap, { bandEdgesKmh, airTempC, airPressureHpa, airHumidityPct, fuel, threads });
  const { traces: _traces, ...out } = summary;
  process.stdout.write(JSON.stringify(out) + "\n");
}

main().then(
  () => { process.exitCode = 0; },
  (e: unknown) => {
    const oneLine = (s: string) => s.replace(/\s*\n\s*/g, " ").trim();
    if (e instanceof UsageError || isEngineError(e) || (e as NodeJS.ErrnoException)?.code?.startsWith?.("E")) {
      process.stderr.write(`error: ${oneLine((e as Error).message)}\n`);
      process.exitCode = 2;
    } else {
      process.stderr.write(`error: internal error: ${oneLine(e instanceof Error ? e.message : String(e))}\n`);
      process.exitCode = 1;
    }
  },
);

import { execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it, vi } from "vitest";

// The analyse CLI contract from the engine issue: one JSON object on stdout and exit 0; any bad
// input exits 2 with exactly one `error: …` line on stderr, nothing on stdout, no stack trace
// (common practice for batch tools: exit status and a single parseable line).
const ROOT = join(__dirname, "..", "..");
// Each case starts the CLI as a child process (and the first builds its bundle): on a busy shared
// machine that can take far longer than vitest's default 30 s. A harness limit, not a speed check.
vi.setConfig({ testTimeout: 180_000 });
const LOG = "sample-data/logs/marlin-kestrel-comma.csv";
const CAR = "sample-data/cars/marlin-sr2.json";
const MAP = "sample-data/logs/marlin-kestrel-comma.map.json";
const dir = mkdtempSync(join(tmpdir(), "rakeline-cli-"));

function cli(args: string[]) {
  const r = spawnSync("npm", ["run", "--silent", "analyse", "--", ...args], { cwd: ROOT, encoding: "utf8" });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

function fifo(): string {
  const p = join(dir, "map.fifo");
  if (!existsSync(p)) execFileSync("mkfifo", [p]);
  return p;
}

function file(name: string, content: string | Buffer): string {
  const p = join(dir, name);
  writeFileSync(p, content);
  return p;
}

describe("analyse CLI: good input", () => {
  it("prints one JSON object with the contract fields and exits 0", () => {
    const r = cli([LOG, "--car", CAR, "--map", MAP, "--bands", "0,80,120,160,260", "--air-temp-c", "20", "--air-pressure-hpa", "1013.25"]);
    expect(r.stderr).toBe("");
    expect(r.status).toBe(0);
    const out = JSON.parse(r.stdout);
    for (const k of ["samples", "duration_s", "air_density_kg_m3"]) expect(typeof out[k]).toBe("number");
    for (const k of ["cla_front_m2", "cla_rear_m2", "cla_total_m2", "balance_front_pct", "samples"]) expect(typeof out.aero[k]).toBe("number");
    for (const k of ["from_front_axle_mm", "cog_from_front_axle_mm", "cop_behind_cog_mm"]) expect(typeof out.cop[k]).toBe("number");
    expect(out.bands.map((b: { min_kmh: number; max_kmh: number }) => [b.min_kmh, b.max_kmh])).toEqual([[0, 80], [80, 120], [120, 160], [160, 260]]);
    for (const b of out.bands) for (const k of ["samples", "aero_load_front_n", "aero_load_rear_n", "balance_front_pct", "understeer_gradient_deg_per_g", "understeer_samples"]) expect(k in b).toBe(true);
    expect(Array.isArray(out.warnings)).toBe(true);
    // Dry air at 20 °C, 1013.25 hPa: ρ = p/(R·T) = 101 325 / (287.05287 × 293.15) = 1.2041 kg/m³ (ISO 2533 constants).
    expect(out.air_density_kg_m3).toBeCloseTo(1.2041, 4);
    expect(r.stdout.trim().split("\n")).toHaveLength(1);
    expect(/NaN|Infinity/.test(r.stdout)).toBe(false);
  });

  it("takes the humidity into the density when given (moist air, CIPM-2007)", () => {
    // 20 °C, 1013.25 hPa, 50 %: water vapour (M 18.0 g/mol) displaces air (29.0 g/mol), so the air is
    // lighter than the dry 1.2041 kg/m³; the ideal-gas mixture (p − e)/(R_d·T) + e/(R_v·T) with
    // e = 0.5 × 2339 Pa (steam tables) gives 1.1988, and CIPM's compressibility adds 0.04 %.
    const r = cli([LOG, "--car", CAR, "--map", MAP, "--air-temp-c", "20", "--air-pressure-hpa", "1013.25", "--humidity-pct", "50"]);
    expect(r.status).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.air.humidity_pct).toBe(50);
    expect(out.air_density_kg_m3).toBeCloseTo(1.1993, 3);
    expect(out.warnings.some((w: { code: string }) => w.code === "air_density_assumed")).toBe(false);
  });

  it("takes the fuel at the start and end as the static-load drift (--fuel-start-kg, --fuel-end-kg)", () => {
    const withTank = file("car-tank.json", JSON.stringify({ ...JSON.parse(readFileSync(join(ROOT, CAR), "utf8")), fuel_tank_from_front_axle_mm: 1300 }));
    const r = cli([LOG, "--car", withTank, "--map", MAP, "--fuel-start-kg", "40", "--fuel-end-kg", "25"]);
    expect(r.stderr).toBe("");
    expect(r.status).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.fuel.source).toBe("given");
    expect([out.fuel.start_kg, out.fuel.end_kg, out.fuel.tank_from_front_axle_mm]).toEqual([40, 25, 1300]);
    // −15 kg × 9.80665 m/s² split by the lever rule about each axle (computed by us): the axles sum to the burn.
    expect(out.fuel.static_load_change_front_n + out.fuel.static_load_change_rear_n).toBeCloseTo(-15 * 9.80665, 0);
    expect(out.warnings.some((w: { code: string }) => w.code === "fuel_not_given")).toBe(false);
    expect(out.summary_version).toBe(2);
  });

  it("answers the same through its cached bundle and straight from the TypeScript", () => {
    // `npm run analyse` starts a cached plain-JS bundle (scripts/analyse.mjs); without a bundler it
    // loads scripts/analyse.ts through tsx. Both must print the same bytes and exit codes.
    const direct = (args: string[]) => spawnSync(process.execPath, ["--import", "tsx", "scripts/analyse.ts", ...args], { cwd: ROOT, encoding: "utf8" });
    for (const args of [[LOG, "--car", CAR, "--map", MAP], [LOG, "--car", CAR, "--map", "no-such-map.json"]]) {
      const viaBundle = cli(args), viaTs = direct(args);
      expect(viaBundle.status).toBe(viaTs.status);
      expect(viaBundle.stdout).toBe(viaTs.stdout);
      expect(viaBundle.stderr).toBe(viaTs.stderr);
    }
  });
});

describe("analyse CLI: bad input exits 2 with one error line", () => {
  const car = JSON.parse(readFileSync(join(ROOT, CAR), "utf8"));
  const map = JSON.parse(readFileSync(join(ROOT, MAP), "utf8"));
  const cases: [string, () => string[], RegExp][] = [
    ["missing log file", () => ["no-such-file.csv", "--car", CAR, "--map", MAP], /no such file/],
    ["empty log file", () => [file("empty.csv", ""), "--car", CAR, "--map", MAP], /empty/],
    ["binary log file", () => [file("bin.csv", Buffer.from([0x50, 0x4b, 3, 4, 0, 0, 1, 2, 3])), "--car", CAR, "--map", MAP], /not a text export|not text/],
    ["car file that is not JSON", () => [LOG, "--car", file("car.json", "{ name: oops"), "--map", MAP], /not valid JSON/],
    ["motion ratio of 7", () => [LOG, "--car", file("car7.json", JSON.stringify({ ...car, front: { ...car.front, motion_ratio: 7 } })), "--map", MAP], /front\.motion_ratio/],
    ["mapped column absent", () => [LOG, "--car", CAR, "--map", file("map.json", JSON.stringify({ ...map, speed: { column: "Velocity", unit: "km/h" } }))], /Velocity/],
    ["unknown unit", () => [LOG, "--car", CAR, "--map", file("map2.json", JSON.stringify({ ...map, speed: { column: "Speed", unit: "furlongs" } }))], /furlongs/],
    ["bad bands", () => [LOG, "--car", CAR, "--map", MAP, "--bands", "0,120,80"], /increase/],
    ["unknown flag", () => [LOG, "--car", CAR, "--map", MAP, "--verbose"], /unknown option --verbose/],
    ["missing --map", () => [LOG, "--car", CAR], /--map/],
    ["non-numeric temperature", () => [LOG, "--car", CAR, "--map", MAP, "--air-temp-c", "warm"], /--air-temp-c/],
    ["only one fuel flag", () => [LOG, "--car", CAR, "--map", MAP, "--fuel-start-kg", "40"], /give both --fuel-start-kg and --fuel-end-kg/],
    ["fuel rising over the stint", () => [LOG, "--car", CAR, "--map", MAP, "--fuel-start-kg", "10", "--fuel-end-kg", "30"], /were the two swapped/],
    ["car file that is a device (it would never end)", () => [LOG, "--car", "/dev/zero", "--map", MAP], /car file \/dev\/zero is not a regular file/],
    ["channel map that is a FIFO (reading would block)", () => [LOG, "--car", CAR, "--map", fifo()], /channel map .* is not a regular file/],
    ["car file of 2 MB", () => [LOG, "--car", file("big-car.json", " ".repeat(2 << 20) + "{}"), "--map", MAP], /car file .* is 2\.1 MB; a car file is a small JSON file/],
    ["humidity over 100 %", () => [LOG, "--car", CAR, "--map", MAP, "--humidity-pct", "120"], /relative humidity \(%\) must be a number from 0 to 100, got 120/],
  ];
  it.each(cases)("%s", (_name, args, message) => {
    const r = cli(args());
    expect(r.status).toBe(2);
    expect(r.stdout).toBe("");
    const lines = r.stderr.trimEnd().split("\n");
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^error: /);
    expect(lines[0]).toMatch(message);
    expect(/\n\s+at /.test(r.stderr)).toBe(false);
  });
});

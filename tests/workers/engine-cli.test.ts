// The browser's engine worker gives the CLI's figures: every committed sample log through the worker
// API over comlink (a MessageChannel, as the page's Worker port) against `npm run analyse` on the same
// file, car, map and options. The CLI prints the summary without its chart traces; every field it
// prints must be equal, to the last digit (both read the whole file in one pass below 34 MB).
import { spawnSync } from "node:child_process";
import { readFileSync, readdirSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it, vi } from "vitest";
import { expose, proxy, wrap } from "comlink";
import { fuelMassKg } from "../../app/engine/fuel";
import type { CarInput, ChannelMap } from "../../app/engine/types";
import { engineApi, type EngineApi, type ReadProgress } from "../../workers/engine-api";

// The CLI starts as a child process (and may build its bundle first): a harness limit, not a speed check.
vi.setConfig({ testTimeout: 180_000 });
const ROOT = join(__dirname, "..", "..");
const LOGS = readdirSync(join(ROOT, "sample-data/logs")).filter((f) => f.endsWith(".csv")).map((f) => `sample-data/logs/${f.slice(0, -4)}`);

function connect() {
  const { port1, port2 } = new MessageChannel();
  expose(engineApi, port1 as unknown as Parameters<typeof expose>[1]);
  return { api: wrap<EngineApi>(port2 as unknown as Parameters<typeof wrap>[0]), close: () => { port1.close(); port2.close(); } };
}

function cli(args: string[]) {
  const r = spawnSync("npm", ["run", "--silent", "analyse", "--", ...args], { cwd: ROOT, encoding: "utf8" });
  if (r.status !== 0) throw new Error(`CLI failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as Record<string, unknown>;
}

function carFileOf(log: string): string {
  const truth = JSON.parse(readFileSync(join(ROOT, `${log}.truth.json`), "utf8"));
  return join(ROOT, "sample-data/logs", truth.car_file);
}

describe("engine worker against the CLI", () => {
  expect(LOGS.length).toBeGreaterThanOrEqual(5);

  it.each(LOGS)("%s: the worker's summary is the CLI's", async (log) => {
    const carPath = carFileOf(log);
    const expected = cli([`${log}.csv`, "--car", carPath, "--map", `${log}.map.json`]);
    const { api, close } = connect();
    try {
      const car = JSON.parse(readFileSync(carPath, "utf8")) as CarInput;
      const map = JSON.parse(readFileSync(join(ROOT, `${log}.map.json`), "utf8")) as ChannelMap;
      const res = await api.analyse(new Blob([readFileSync(join(ROOT, `${log}.csv`))]), car, map);
      if (!res.ok) throw new Error(res.message);
      const got = JSON.parse(JSON.stringify(res.value)) as Record<string, unknown>;
      expect(Object.keys(got).filter((k) => !(k in expected))).toEqual(["traces"]);
      for (const key of Object.keys(expected)) expect({ key, value: got[key] }).toEqual({ key, value: expected[key] });
    } finally {
      close();
    }
  });

  it("with bands, weather and fuel in litres the worker still matches the CLI given the same kilograms", async () => {
    const log = "sample-data/logs/marlin-kestrel-comma";
    const carPath = carFileOf(log);
    // The page asks for litres; fuelMassKg turns them into the engine's kilograms (0.745 kg/L petrol).
    const startKg = fuelMassKg(40), endKg = fuelMassKg(31.5);
    const expected = cli([`${log}.csv`, "--car", carPath, "--map", `${log}.map.json`, "--bands", "0,90,140,260",
      "--air-temp-c", "27", "--air-pressure-hpa", "996", "--humidity-pct", "61", "--fuel-start-kg", String(startKg), "--fuel-end-kg", String(endKg)]);
    const { api, close } = connect();
    try {
      const progress: ReadProgress[] = [];
      const res = await api.analyse(
        new Blob([readFileSync(join(ROOT, `${log}.csv`))]),
        JSON.parse(readFileSync(carPath, "utf8")),
        JSON.parse(readFileSync(join(ROOT, `${log}.map.json`), "utf8")),
        { bandEdgesKmh: [0, 90, 140, 260], airTempC: 27, airPressureHpa: 996, airHumidityPct: 61, fuel: { startKg, endKg } },
        proxy((p: ReadProgress) => { progress.push(p); }),
      );
      if (!res.ok) throw new Error(res.message);
      const got = JSON.parse(JSON.stringify(res.value)) as Record<string, unknown>;
      for (const key of Object.keys(expected)) expect({ key, value: got[key] }).toEqual({ key, value: expected[key] });
      expect(progress.at(-1)?.bytes).toBe(progress.at(-1)?.totalBytes);
    } finally {
      close();
    }
  });
});

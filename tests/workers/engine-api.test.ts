import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { expose, proxy, wrap } from "comlink";
import { engineApi, type EngineApi, type ReadProgress } from "../../workers/engine-api";
import type { CarInput, ChannelMap } from "../../app/engine/types";

const LOG = "sample-data/logs/marlin-kestrel-semicolon";
const bytes = readFileSync(`${LOG}.csv`);
const map = JSON.parse(readFileSync(`${LOG}.map.json`, "utf8")) as ChannelMap;
const truth = JSON.parse(readFileSync(`${LOG}.truth.json`, "utf8"));
const car = JSON.parse(readFileSync(new URL(truth.car_file, new URL(`../../${LOG}.csv`, import.meta.url)), "utf8")) as CarInput;

/** The page reaches the worker through comlink over a message port; the same is done here with a MessageChannel. */
function connect(): { api: ReturnType<typeof wrap<EngineApi>>; close(): void } {
  const { port1, port2 } = new MessageChannel();
  expose(engineApi, port1 as unknown as Parameters<typeof expose>[1]);
  const api = wrap<EngineApi>(port2 as unknown as Parameters<typeof wrap>[0]);
  return { api, close: () => { port1.close(); port2.close(); } };
}

describe("engine worker API over comlink", () => {
  it("proposes the channel map the demo generator wrote for this log", async () => {
    const { api, close } = connect();
    const COMMA = "sample-data/logs/marlin-kestrel-comma";
    const commaMap = JSON.parse(readFileSync(`${COMMA}.map.json`, "utf8")) as ChannelMap;
    try {
      const res = await api.inspect(new Blob([readFileSync(`${COMMA}.csv`)]));
      expect(res.ok).toBe(true);
      if (!res.ok) return;
      // The generator's map.json is the truth for which column holds which channel.
      for (const [channel, entry] of Object.entries(commaMap)) {
        expect(res.value.suggestion.map[channel as keyof ChannelMap]?.column).toBe(entry!.column);
      }
      expect(res.value.header.delimiter).toBe(",");
    } finally {
      close();
    }
  });

  it("analyses the whole file in the worker, reports progress to the end and recovers the generator's ClA", async () => {
    const { api, close } = connect();
    try {
      const seen: ReadProgress[] = [];
      const res = await api.analyse(new Blob([bytes]), car, map, {}, proxy((p: ReadProgress) => { seen.push(p); }));
      expect(res.ok).toBe(true);
      if (!res.ok) return;
      // Demo truth, within the tolerance (ClA within 5 %).
      expect(Math.abs(res.value.aero.cla_front_m2! / truth.cla_front_m2 - 1)).toBeLessThan(0.05);
      expect(Math.abs(res.value.aero.cla_rear_m2! / truth.cla_rear_m2_fit - 1)).toBeLessThan(0.05);
      // The last report covers the whole file: every byte, and every line end (counted here independently).
      const last = seen.at(-1)!;
      expect(last.bytes).toBe(bytes.length);
      expect(last.totalBytes).toBe(bytes.length);
      expect(last.rows).toBe(bytes.toString("latin1").split("\n").length - 1);
      expect(last.elapsedMs).toBeGreaterThan(0);
    } finally {
      close();
    }
  });

  it("checks the channels' signs on the start of the file and proposes the steering flip the map makes", async () => {
    // The generator logs this car's steering with the opposite sign; the committed map inverts it.
    const { api, close } = connect();
    try {
      const { steer, ...rest } = map;
      const res = await api.checkSigns(new Blob([bytes]), { ...rest, steer: { column: steer.column, unit: steer.unit } });
      expect(res.ok).toBe(true);
      if (!res.ok) return;
      expect(res.value.filter((c) => c.verdict === "invert").map((c) => c.channel)).toEqual(["steer"]);
      const bad = await api.checkSigns(new Blob([bytes]), { ...map, speed: { column: "No such column", unit: "km/h" } });
      expect(bad.ok).toBe(false);
    } finally {
      close();
    }
  });

  it("returns an input problem as data with its code, not as a thrown error", async () => {
    const { api, close } = connect();
    try {
      const binary = new Uint8Array(4096);
      binary.set([80, 75, 3, 4]); // a ZIP signature followed by NUL bytes
      const res = await api.inspect(new Blob([binary]));
      expect(res).toMatchObject({ ok: false, code: "not_text" });
    } finally {
      close();
    }
  });

  it("splits a file over two engine workers and merges their parts into the whole-file summary", async () => {
    const a = connect(), b = connect();
    try {
      const file = new Blob([bytes]);
      const limits = { minPartBytes: 96 << 10, leadInBytes: 48 << 10 };
      const plan = await a.api.planParts(file, map, {}, 2, limits);
      expect(plan?.parts.length).toBe(2);
      // This car file gives no static readings: part 1 takes over part 0's static reference.
      const r0 = await a.api.analysePart(file, car, map, {}, plan!, 0, null);
      if (!r0.ok) throw new Error(r0.message);
      const r1 = await b.api.analysePart(file, car, map, {}, plan!, 1, r0.value.summary.seed);
      if (!r1.ok) throw new Error(r1.message);
      const merged = await a.api.merge(car, map, {}, plan!, [r0.value, r1.value]);
      const whole = await a.api.analyse(file, car, map);
      if (!merged.ok || !whole.ok) throw new Error("analysis failed");
      expect(merged.value.samples).toBe(whole.value.samples);
      // Same figures up to the last printed digit (summation order differs between the runs).
      expect(merged.value.aero.cla_total_m2!).toBeCloseTo(whole.value.aero.cla_total_m2!, 3);
      expect(merged.value.aero.balance_front_pct!).toBeCloseTo(whole.value.aero.balance_front_pct!, 1);
      merged.value.bands.forEach((band, i) => expect(band.samples).toBeCloseTo(whole.value.bands[i].samples, -1));
    } finally {
      a.close();
      b.close();
    }
  });
});

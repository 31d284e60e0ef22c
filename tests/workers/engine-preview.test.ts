// The Channel map step's data from the worker: column previews over the first minutes and the unit
// proposals. Previews are checked against papaparse (a reference CSV library) reading the same bytes;
// the unit proposals against the slips the engine's checks name (app/engine/unit-check.ts).
import { readFileSync } from "node:fs";
import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { expose, wrap } from "comlink";
import type { ChannelMap } from "../../app/engine/types";
import { engineApi, type EngineApi, SIGN_CHECK_BYTES } from "../../workers/engine-api";
import { PREVIEW_BUCKETS } from "../../workers/column-preview";

function connect() {
  const { port1, port2 } = new MessageChannel();
  expose(engineApi, port1 as unknown as Parameters<typeof expose>[1]);
  return { api: wrap<EngineApi>(port2 as unknown as Parameters<typeof wrap>[0]), close: () => { port1.close(); port2.close(); } };
}

const LOG = "sample-data/logs/marlin-kestrel-semicolon";
const bytes = readFileSync(`${LOG}.csv`);
const map = JSON.parse(readFileSync(`${LOG}.map.json`, "utf8")) as ChannelMap;

/** The data rows papaparse reads from the first SIGN_CHECK_BYTES bytes (whole rows only), by header name. */
function referenceRows(buf: Buffer, headerLine: number, unitsRow: boolean, decimalComma: boolean): Record<string, number>[] {
  let text = buf.subarray(0, Math.min(buf.length, SIGN_CHECK_BYTES)).toString("utf8");
  if (buf.length > SIGN_CHECK_BYTES) text = text.slice(0, text.lastIndexOf("\n") + 1);
  const lines = text.split(/\r?\n/).slice(headerLine - 1);
  const parsed = Papa.parse<string[]>(lines.join("\n"), { skipEmptyLines: true });
  const [head, ...rest] = parsed.data;
  const data = unitsRow ? rest.slice(1) : rest;
  return data.map((cells) => Object.fromEntries(head.map((h, i) => [h.trim(), Number((cells[i] ?? "").replace(decimalComma ? "," : "\u0000", "."))])));
}

describe("column previews for the Channel map step", () => {
  it("gives every numeric column's min and max per bucket over the first minutes, as papaparse reads them", async () => {
    const { api, close } = connect();
    try {
      const res = await api.inspect(new Blob([bytes]));
      if (!res.ok) throw new Error(res.message);
      const { header, preview } = res.value;
      expect(preview).not.toBeNull();
      const rows = referenceRows(bytes, header.headerLine, header.unitsRow, header.decimalComma);
      expect(preview!.rows).toBe(rows.length);
      expect(preview!.timeColumn).toBe(map.time.column);
      const n = Math.ceil(rows.length / preview!.bucketRows);
      expect(n).toBeLessThanOrEqual(PREVIEW_BUCKETS);
      for (const column of header.numericColumns) {
        const got = preview!.columns[column];
        expect(got.min).toBeInstanceOf(Float64Array);
        expect(got.min.length).toBe(n);
        for (const b of [0, Math.floor(n / 2), n - 1]) {
          const slice = rows.slice(b * preview!.bucketRows, (b + 1) * preview!.bucketRows).map((r) => r[column]);
          expect([got.min[b], got.max[b]]).toEqual([Math.min(...slice), Math.max(...slice)]);
        }
      }
    } finally {
      close();
    }
  });

  it("orders the rows by another column when the suggested time column goes backwards", async () => {
    // A small invented export whose first column counts down (a distance-to-go channel): it cannot order rows.
    const lines = ["Countdown,Clock,Speed", ...Array.from({ length: 300 }, (_, i) => `${300 - i},${(i * 0.01).toFixed(2)},${100 + (i % 7)}`)];
    const { api, close } = connect();
    try {
      const res = await api.inspect(new Blob([lines.join("\n") + "\n"]));
      if (!res.ok) throw new Error(res.message);
      expect(res.value.preview?.timeColumn).toBe("Clock");
      expect(res.value.preview?.rows).toBe(300);
      // Rows 0…299 one per bucket (300 < 400 buckets): the first Countdown value is 300 (hand-computed).
      expect(res.value.preview?.columns.Countdown.max[0]).toBe(300);
    } finally {
      close();
    }
  });
});

describe("unit proposals on the first minutes", () => {
  const car = { steering_ratio: 12, wheelbase_mm: 2600 };

  it("has nothing to propose for the generator's own map", async () => {
    const { api, close } = connect();
    try {
      const res = await api.checkUnits(new Blob([bytes]), map, car);
      expect(res).toEqual({ ok: true, value: [] });
    } finally {
      close();
    }
  });

  it("names the slip when time, a damper or lat_accel is mapped in the wrong unit", async () => {
    const { api, close } = connect();
    try {
      // This log's clock is in milliseconds; mapped as seconds its rate comes out 1000 times too low (< 1 Hz).
      expect(map.time.unit).toBe("ms");
      const time = await api.checkUnits(new Blob([bytes]), { ...map, time: { ...map.time, unit: "s" } }, car);
      expect(time.ok && time.value.map((c) => [c.channel, c.verdict])).toEqual([["time", "check_unit"]]);
      expect(time.ok && time.value[0].detail).toMatch(/logged in ms but mapped as s/);
      // Its dampers are in inches; mapped as millimetres the range comes out 25.4 times too small (< 2 mm).
      expect(map.damper_rl.unit).toBe("in");
      const damper = await api.checkUnits(new Blob([bytes]), { ...map, damper_rl: { ...map.damper_rl, unit: "mm" } }, car);
      expect(damper.ok && damper.value.map((c) => c.channel)).toEqual(["damper_rl"]);
      // Its accelerations are in m/s²; mapped as g the corners come out at over 6 g.
      expect(map.lat_accel.unit).toBe("m/s2");
      const lat = await api.checkUnits(new Blob([bytes]), { ...map, lat_accel: { ...map.lat_accel, unit: "g" } }, car);
      expect(lat.ok && lat.value.map((c) => c.channel)).toEqual(["lat_accel"]);
      expect(lat.ok && lat.value[0].detail).toMatch(/logged in m\/s² but mapped as g/);
    } finally {
      close();
    }
  });
});

import { describe, expect, it } from "vitest";
import { analyseLog } from "~/engine/analyse";
import { writeExport } from "../../sample-data/export-writer";
import { exportColumns, LOGS, mapFor, simulate } from "../../sample-data/generate";
import { carFile } from "../../sample-data/scenario";
import type { SimColumns } from "../../sample-data/sim";

// A logger that restarts mid-stint: the rows of ~46 s are missing, time jumps forward and the speed
// jumps from the fastest point of a lap (≈219 km/h) to a slow corner (≈64 km/h). Across the break the
// speed's slope is the jump, not an acceleration (a = dv/dt only between rows logged in sequence;
// common practice), so it must not read as a unit slip (it once produced "speed is probably logged
// in km/h but mapped as mph" and withheld every balance).
const SPEC = LOGS.find((l) => l.file === "marlin-kestrel-splitter.csv")!;

function withRestart(cols: SimColumns): { cols: SimColumns; gapS: number } {
  const n = cols.time.length;
  let cut = Math.floor(n * 0.4);
  for (let i = cut; i < cut + 3000; i++) if (cols.speed[i] > cols.speed[cut]) cut = i;
  let res = cut + 500;
  for (let i = cut + 500; i < cut + 4000; i++) if (cols.speed[i] < cols.speed[res]) res = i;
  const out = {} as SimColumns;
  for (const k of Object.keys(cols) as (keyof SimColumns)[]) out[k] = Float64Array.from([...cols[k].subarray(0, cut), ...cols[k].subarray(res)]);
  return { cols: out, gapS: cols.time[res] - cols.time[cut] };
}

describe("a logger restart (time and speed jump)", () => {
  it("raises no unit warning and keeps the band balances within 1 point of the stint's truth", async () => {
    const { columns, truth } = simulate(SPEC);
    const { cols, gapS } = withRestart(columns);
    expect(gapS).toBeGreaterThan(20);
    const bytes = new TextEncoder().encode([...writeExport(exportColumns(SPEC, cols), SPEC.metadata, SPEC.dialect)].join(""));
    const s = await analyseLog((async function* () { yield bytes; })(), carFile(SPEC.car, true), mapFor(SPEC), {});
    expect(s.warnings.filter((w) => w.code === "suspected_unit_error")).toEqual([]);
    let checked = 0;
    s.bands.forEach((band, b) => {
      const t = truth.bands[b];
      if (t.balance_front_pct === null || band.aero_samples < 20 * s.sample_rate_hz! || t.aero_load_front_n! + t.aero_load_rear_n! < 0.05 * 620 * 9.80665) return;
      // The truth is the whole stint's (the restart drops 46 s of 329 s): the 1-point bar.
      expect(Math.abs(band.balance_front_pct! - t.balance_front_pct)).toBeLessThan(1);
      checked++;
    });
    expect(checked).toBeGreaterThanOrEqual(3);
  });
});

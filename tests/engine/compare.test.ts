import { describe, expect, it } from "vitest";
import { analyseLog } from "~/engine/analyse";
import { compareSessions } from "~/engine/compare";
import type { SessionSummary } from "~/engine/summary";
import { exportColumns, LOGS, mapFor, simulate } from "../../sample-data/generate";
import { writeExport } from "../../sample-data/export-writer";
import { carFile } from "../../sample-data/scenario";
import type { LogSpec } from "../../sample-data/generate";
import type { SimTruth } from "../../sample-data/sim";

// What a wing change did, against the demo generator's truth: the simulation knows each stint's
// true balance, so the change the comparison reports must match the true change (within the
// engine issue's 1-point balance tolerance) and stand clear of the noise, while two stints of the
// same setup must not show a clear change. Stints are generated in memory.
async function stint(spec: LogSpec): Promise<{ s: SessionSummary; truth: SimTruth }> {
  const { columns, truth } = simulate(spec);
  const bytes = new TextEncoder().encode([...writeExport(exportColumns(spec, columns), spec.metadata, spec.dialect)].join(""));
  return { s: await analyseLog((async function* () { yield bytes; })(), carFile(spec.car, spec.withStatic), mapFor(spec)), truth };
}

describe("comparing two sessions", () => {
  const base = LOGS[0];

  it("a 15 % larger rear ClA (more rear wing) moves the balance rearward, clearly and by the true amount", async () => {
    const before = await stint({ ...base, seed: 201 });
    const after = await stint({ ...base, seed: 203, car: { ...base.car, claRearM2: base.car.claRearM2 * 1.15 } });
    const c = compareSessions(before.s, after.s);
    expect(c.balance_front_pct.clear).toBe(true);
    expect(c.balance_front_pct.change!).toBeLessThan(0);
    expect(Math.abs(c.balance_front_pct.change! - (after.truth.balance_front_pct - before.truth.balance_front_pct))).toBeLessThan(1);
    expect(c.cla_rear_m2.clear).toBe(true);
    expect(c.cla_rear_m2.change!).toBeCloseTo(after.truth.cla_rear_m2_fit - before.truth.cla_rear_m2_fit, 2);
    const fast = c.bands.filter((b) => b.min_kmh >= 120);
    expect(fast.length).toBeGreaterThanOrEqual(3);
    for (const b of fast) {
      expect(b.balance_front_pct.clear).toBe(true);
      expect(b.balance_front_pct.change!).toBeLessThan(-2);
    }
  }, 30_000);

  it("two stints of the same setup show no clear change in balance or ClA", async () => {
    const a = await stint({ ...base, seed: 204 });
    const b = await stint({ ...base, seed: 205 });
    const c = compareSessions(a.s, b.s);
    expect(c.balance_front_pct.clear).toBe(false);
    expect(c.cla_front_m2.clear).toBe(false);
    expect(c.cla_rear_m2.clear).toBe(false);
    for (const band of c.bands) if (band.balance_front_pct.change !== null) expect(Math.abs(band.balance_front_pct.change)).toBeLessThan(0.6);
    expect(c.notes).toEqual([]);
  }, 30_000);

  it("compares only bands with the same edges, and says so", async () => {
    const a = await stint({ ...base, seed: 204 });
    const other = { ...a.s, bands: a.s.bands.slice(1) };
    const c = compareSessions(a.s, other);
    expect(c.bands).toHaveLength(a.s.bands.length - 1);
    expect(c.notes.join(" ")).toMatch(/different speed bands/);
  }, 30_000);
});

import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyseLog } from "~/engine/analyse";
import { fuelMassKg } from "~/engine/fuel";
import type { SessionSummary } from "~/engine/summary";
import type { SummaryOptions } from "~/engine/summary-options";
import { writeExport } from "../../sample-data/export-writer";
import { exportColumns, LOGS, mapFor, simulate } from "../../sample-data/generate";
import type { LogSpec } from "../../sample-data/generate";
import type { SimTruth } from "../../sample-data/sim";

// The engine against the simulator's truth on the low-splitter Marlin: front aero in ground effect
// (balance moving about 3 points forward with speed), lap speeds varying ±1 % and rising 3 % over
// the stint, fuel burning from the tank position in the car file, sensor noise as on a real 200 Hz
// logger (≈0.015 g lateral, ≈0.35° at the wheel) and corners entered through transition spirals.
// Tolerances from the engine issue: band balance within 1 point, balance shift within 0.75 point,
// understeer gradient within 0.15 deg/g in every band with ≥ 5 s of steady cornering; ride height
// and rake per band within 0.5 mm (ours: a fifth of the 2–3 mm a splitter change moves, common practice).
const ROOT = join(__dirname, "..", "..");
const SPLITTER = LOGS.find((l) => l.file === "marlin-kestrel-splitter.csv")!;
const SEMICOLON = LOGS.find((l) => l.file === "marlin-kestrel-semicolon.csv")!;

/** The same stint written in another dialect and at 200 Hz, in memory (not committed). */
const DIALECTS: [string, LogSpec][] = [
  ["comma, 50 Hz (the committed demo log)", SPLITTER],
  ["semicolon, decimal comma, mph, inches, inverted steer, dropouts, 200 Hz", { ...SEMICOLON, car: SPLITTER.car, sim: SPLITTER.sim, seed: 42, rateHz: 200, carFile: "marlin-sr2-no-static.json", withStatic: false }],
];

async function run(spec: LogSpec, fuelGiven: boolean): Promise<{ s: SessionSummary; truth: SimTruth }> {
  const { columns, truth } = simulate(spec);
  const bytes = new TextEncoder().encode([...writeExport(exportColumns(spec, columns), spec.metadata, spec.dialect)].join(""));
  const car = JSON.parse(readFileSync(join(ROOT, "sample-data", "cars", spec.carFile), "utf8"));
  // 40 L at the start (the log's preamble), the simulation's burn to the end.
  const start = fuelMassKg(40);
  const options: SummaryOptions = fuelGiven ? { fuel: { startKg: start, endKg: start - truth.fuel_burnt_kg } } : {};
  const s = await analyseLog((async function* () { yield bytes; })(), car, mapFor(spec), options);
  return { s, truth };
}

describe.each(DIALECTS)("ride-height-sensitive aero, %s", (_name, spec) => {
  describe.each([["fuel given", true], ["fuel not given", false]] as const)("%s", (_f, fuelGiven) => {
    const result = run(spec, fuelGiven);

    it("band balance within 1 point, and the shift between the lowest and highest band within 0.75 point", async () => {
      const { s, truth } = await result;
      const rate = s.sample_rate_hz!;
      let checked = 0;
      s.bands.forEach((band, b) => {
        const t = truth.bands[b];
        // Bands with 20 s of running and an aero load over 5 % of the car's weight (the engine's own rule).
        if (t.balance_front_pct === null || band.aero_samples < 20 * rate || t.aero_load_front_n! + t.aero_load_rear_n! < 0.05 * 620 * 9.80665) return;
        expect(band.balance_front_pct).not.toBeNull();
        expect(Math.abs(band.balance_front_pct! - t.balance_front_pct)).toBeLessThan(1);
        checked++;
      });
      expect(checked).toBeGreaterThanOrEqual(3);
      // One rule for both (BALANCE_SHIFT_RULE, app/engine/bands.ts): the truth applies it to the true
      // loads, the engine to its estimates; both must pick the same bands.
      const shift = s.aero.balance_shift!;
      const truthShift = truth.balance_shift!;
      expect(shift.low_band_kmh).toEqual(truthShift.low_band_kmh);
      expect(shift.high_band_kmh).toEqual(truthShift.high_band_kmh);
      expect(truthShift.points).toBeGreaterThan(2); // the scenario's migration is real
      expect(Math.abs(shift.points - truthShift.points)).toBeLessThan(0.75);
      // CoP = L·(1 − balance) (common practice): the CoP moves forward by L·Δbalance/100.
      expect(shift.cop_shift_mm).toBeCloseTo((2450 * shift.points) / 100, 0);
      expect(s.fuel.source).toBe(fuelGiven ? "given" : "fitted_drift");
    });

    it("an understeer gradient within 0.15 deg/g in every band with 5 s of steady cornering", async () => {
      const { s, truth } = await result;
      let checked = 0;
      s.bands.forEach((band, b) => {
        const t = truth.bands[b];
        if (t.steady_cornering_s < 5 || t.understeer_gradient_deg_per_g === null) return;
        expect(band.understeer_gradient_deg_per_g).not.toBeNull();
        expect(Math.abs(band.understeer_gradient_deg_per_g! - t.understeer_gradient_deg_per_g)).toBeLessThan(0.15);
        expect(band.steady_cornering_s).toBeGreaterThanOrEqual(5);
        // Recall: the segments keep most of the truth's steady arcs (constant curvature, |ay| ≥ 0.2 g,
        // |ax| ≤ 0.1 g), not the few per cent a per-cell sample count kept before (our bar: 80 %).
        expect(band.steady_cornering_s).toBeGreaterThanOrEqual(0.8 * t.steady_cornering_s);
        checked++;
      });
      expect(checked).toBeGreaterThanOrEqual(4);
    });

    it("ride-height change and rake per band within 0.5 mm", async () => {
      const { s, truth } = await result;
      const rate = s.sample_rate_hz!;
      let checked = 0;
      s.bands.forEach((band, b) => {
        const t = truth.bands[b];
        if (t.ride_height_change_front_mm === null || t.ride_height_change_rear_mm === null || band.aero_samples < 20 * rate) return;
        expect(Math.abs(band.ride_height_change_front_mm! - t.ride_height_change_front_mm)).toBeLessThan(0.5);
        expect(Math.abs(band.ride_height_change_rear_mm! - t.ride_height_change_rear_mm)).toBeLessThan(0.5);
        // Rake = rear − front ride height (common practice).
        expect(Math.abs(band.rake_change_mm! - (t.ride_height_change_rear_mm - t.ride_height_change_front_mm))).toBeLessThan(0.5);
        checked++;
      });
      expect(checked).toBeGreaterThanOrEqual(3);
    });

    it("laser ride heights and rake per band within 0.5 mm, where the log has them", async () => {
      const { s, truth } = await result;
      if (!spec.columns.some((c) => c.channel === "ride_height_front")) return expect(s.bands.every((b) => b.ride_height_front_mm === null && b.rake_mm === null)).toBe(true);
      const rate = s.sample_rate_hz!;
      let checked = 0;
      s.bands.forEach((band, b) => {
        const t = truth.bands[b];
        if (t.ride_height_front_mm === null || t.ride_height_rear_mm === null || band.aero_samples < 20 * rate) return;
        expect(Math.abs(band.ride_height_front_mm! - t.ride_height_front_mm)).toBeLessThan(0.5);
        expect(Math.abs(band.ride_height_rear_mm! - t.ride_height_rear_mm)).toBeLessThan(0.5);
        // Rake = rear − front ride height (common practice).
        expect(Math.abs(band.rake_mm! - (t.ride_height_rear_mm - t.ride_height_front_mm))).toBeLessThan(0.5);
        checked++;
      });
      expect(checked).toBeGreaterThanOrEqual(3);
    });
  });
});

import { describe, expect, it } from "vitest";
import { DEFAULT_PETROL_DENSITY_KG_PER_L, fuelAxleLoadChangeN, fuelMassKg, validateFuel } from "~/engine/fuel";
import { EngineError } from "~/engine/errors";
import { createSummaryBuilder } from "~/engine/summary";
import type { SummaryOptions } from "~/engine/summary-options";
import type { CarInput } from "~/engine/types";
import { carFor, emptyTrace, toBlocks } from "./summary-synthetic";

describe("fuel mass and its split over the axles", () => {
  it("turns litres into kilograms with the petrol density by default", () => {
    // EN 228 allows 720–775 kg/m³ at 15 °C for unleaded petrol (from memory); the default sits inside.
    expect(DEFAULT_PETROL_DENSITY_KG_PER_L).toBeGreaterThanOrEqual(0.72);
    expect(DEFAULT_PETROL_DENSITY_KG_PER_L).toBeLessThanOrEqual(0.775);
    // 40 L ≈ 290 N of static load (common practice): 40 × 0.745 × 9.80665 = 292.2 N (computed by us).
    expect(fuelMassKg(40) * 9.80665).toBeCloseTo(292.24, 1);
    expect(fuelMassKg(50, 0.72)).toBeCloseTo(36, 10);
    expect(() => fuelMassKg(-1)).toThrow(EngineError);
    expect(() => fuelMassKg(10, 7.45)).toThrow(/fuel density must be a number from 0\.5 to 1\.2 kg\/L, got 7\.45/);
  });

  it("splits a load over the axles by moments about each axle (lever rule)", () => {
    // Static weight split by the CoG position is the same rule (Gillespie ch. 1, from memory):
    // a tank at x behind the front axle puts W·(1 − x/L) on the front and W·x/L on the rear.
    const { front, rear } = fuelAxleLoadChangeN(-30, 1.5, 2.5);
    expect(front + rear).toBeCloseTo(-30 * 9.80665, 9);
    expect(front).toBeCloseTo(-30 * 9.80665 * 0.4, 9);
    // A tank on the front axle loads only the front.
    expect(fuelAxleLoadChangeN(10, 0, 2.5).rear).toBe(0);
  });

  it("refuses fuel that rises over a stint or is not a mass", () => {
    expect(() => validateFuel({ startKg: 20, endKg: 40 })).toThrow(/were the two swapped/);
    expect(() => validateFuel({ startKg: Number.NaN, endKg: 4 })).toThrow(/fuel at the start must be a number/);
  });
});

// Synthetic stint with a fuel burn: axle loads = ClA·q (square law, common practice) + the burn's
// static-load change split by the tank position, speed swinging as in summary.test.ts.
const CLA_F = 0.45, CLA_R = 0.75, RHO = 1.225;
function burningStint(car: CarInput, startKg: number, endKg: number, seconds = 600, hz = 50) {
  const tr = emptyTrace();
  const L = car.wheelbase_mm / 1000, x = (car.fuel_tank_from_front_axle_mm ?? 0) / 1000;
  const n = seconds * hz;
  for (let i = 0; i < n; i++) {
    const t = i / hz;
    const w = (2 * Math.PI) / 37;
    const v = 38 + 18 * Math.sin(w * t) + 3 * Math.sin(t / 90);
    const q = 0.5 * RHO * v * v;
    const burnt = ((startKg - endKg) * i) / (n - 1);
    tr.time.push(t); tr.speed.push(v); tr.ax.push(0); tr.ay.push(0); tr.steer.push(0);
    tr.loadFront.push(CLA_F * q - burnt * 9.80665 * (1 - x / L));
    tr.loadRear.push(CLA_R * q - burnt * 9.80665 * (x / L));
  }
  return tr;
}

function run(car: CarInput, options: SummaryOptions) {
  const b = createSummaryBuilder(car, options);
  for (const blk of toBlocks(burningStint(car, 60, 20), car)) b.push(blk);
  return b.finish();
}

describe("fuel as a known input", () => {
  const car = carFor({ fuel_tank_from_front_axle_mm: 1900 });

  it("takes the given burn as the static-load drift and reports it", () => {
    const s = run(car, { fuel: { startKg: 60, endKg: 20 } });
    expect(s.fuel.source).toBe("given");
    expect(s.fuel.start_kg).toBe(60);
    expect(s.fuel.tank_from_front_axle_mm).toBe(1900);
    // −40 kg × g × (1 − 1.9/2.6) on the front (computed by us from the lever rule).
    expect(s.fuel.static_load_change_front_n!).toBeCloseTo(-40 * 9.80665 * (0.7 / 2.6), 0);
    expect(s.fuel.static_load_change_rear_n!).toBeCloseTo(-40 * 9.80665 * (1.9 / 2.6), 0);
    expect(s.aero.cla_front_m2!).toBeCloseTo(CLA_F, 2);
    expect(s.aero.cla_rear_m2!).toBeCloseTo(CLA_R, 2);
    expect(s.warnings.map((w) => w.code)).not.toContain("fuel_not_given");
  });

  it("falls back to a fitted trend without the fuel, and says so", () => {
    const s = run(car, {});
    expect(s.fuel.source).toBe("fitted_drift");
    expect(s.warnings.map((w) => w.code)).toContain("fuel_not_given");
    expect(s.fuel.static_load_change_rear_n!).toBeLessThan(0);
  });

  it("without a tank position, splits the burn like the static weight and warns", () => {
    const noTank = carFor();
    const s = run(noTank, { fuel: { startKg: 60, endKg: 20 } });
    expect(s.warnings.map((w) => w.code)).toContain("fuel_tank_position_assumed");
    expect(s.fuel.static_load_change_front_n!).toBeCloseTo(-40 * 9.80665 * 0.55, 0);
  });
});

import { describe, expect, it } from "vitest";
import { carModel, validateCar } from "~/engine/car";
import { EngineError } from "~/engine/errors";
import {
  balanceFrontPct, bumpStopForceN, cogFromFrontAxleMm, copFromFrontAxleMm, frontLoadTransferN, rideHeightChangeMm, wheelForceChangeN, wheelRateNPerMm,
} from "~/engine/physics";
import { bandIndex, bandEdgesMs, parseBandEdges } from "~/engine/bands";
import { carFor } from "./summary-synthetic";

describe("suspension relations", () => {
  it("wheel rate Ks·MR² and wheel force Ks·MR·Δx agree by virtual work", () => {
    // Barton & Fieldhouse, Automotive Chassis Engineering (2018) §3.9: Kw = Ks·MR², ΔFw = Ks·MR·Δx.
    // 100 N/mm at the damper, MR 0.8: wheel rate 64 N/mm; 8 mm of damper travel = 10 mm at the
    // wheel, so the wheel force changes by 64 × 10 = 640 N = 100 × 0.8 × 8.
    expect(wheelRateNPerMm(100, 0.8)).toBeCloseTo(64, 12);
    expect(wheelForceChangeN(8, 100, 0.8)).toBeCloseTo(640, 12);
    expect(wheelForceChangeN(8, 100, 0.8)).toBeCloseTo(wheelRateNPerMm(100, 0.8) * (8 / 0.8), 12);
  });

  it("a bump stop adds Kbs·MR·(x − gap) only past the gap", () => {
    // Piecewise spring (common practice): below the gap only the spring acts.
    expect(wheelForceChangeN(5, 100, 0.9, 10, 400)).toBeCloseTo(100 * 0.9 * 5, 12);
    // 14 mm with a 10 mm gap and 400 N/mm stop: 90·14 + 360·4 = 1260 + 1440 N.
    expect(wheelForceChangeN(14, 100, 0.9, 10, 400)).toBeCloseTo(2700, 12);
  });

  it("a progressive stop is read off its force/deflection table, linearly between rows", () => {
    // Piecewise-linear interpolation of a measured curve (common practice for rubber stops, which
    // stiffen as they compress); past the last row the last segment's slope carries on.
    const x = [0, 2, 4, 6], f = [0, 300, 900, 2000];
    expect(bumpStopForceN(-1, x, f)).toBe(0);
    expect(bumpStopForceN(0, x, f)).toBe(0);
    expect(bumpStopForceN(1, x, f)).toBeCloseTo(150, 12);
    expect(bumpStopForceN(3, x, f)).toBeCloseTo(600, 12);
    expect(bumpStopForceN(6, x, f)).toBeCloseTo(2000, 12);
    expect(bumpStopForceN(7, x, f)).toBeCloseTo(2000 + 1100 / 2, 12);
    // A linear stop is the two-row curve (0, 0), (1 mm, rate): the same force as Kbs·(x − gap).
    const linear = carModel(carFor({ front: { spring_rate_n_per_mm: 100, motion_ratio: 0.9, bump_stop: { gap_mm: 10, rate_n_per_mm: 400 } } })).bumpCurveFront!;
    expect(bumpStopForceN(4, linear.deflectionMm, linear.forceN) * 0.9).toBeCloseTo(wheelForceChangeN(14, 100, 0.9, 10, 400) - 100 * 0.9 * 14, 9);
    // A table that starts past contact gets contact (0 mm, 0 N) in front of it.
    const late = carModel(carFor({ front: { spring_rate_n_per_mm: 100, motion_ratio: 0.9, bump_stop: { gap_mm: 10, rate_n_per_mm: 400, force_table: [{ deflection_mm: 1, force_n: 100 }, { deflection_mm: 3, force_n: 900 }] } } })).bumpCurveFront!;
    expect(Array.from(late.deflectionMm)).toEqual([0, 1, 3]);
    expect(bumpStopForceN(0.5, late.deflectionMm, late.forceN)).toBeCloseTo(50, 12);
  });

  it("longitudinal load transfer m·ax·h/L loads the front under braking", () => {
    // Statics of a decelerating car (Gillespie ch. 2, from memory): ΔFz_front = −m·ax·h/L.
    // 1000 kg braking at 1 g with h 0.5 m on L 2.5 m: 1000 × 9.80665 × 0.5 / 2.5 = 1961.33 N onto the front.
    expect(frontLoadTransferN(1000, -9.80665, 0.5, 2.5)).toBeCloseTo(1961.33, 2);
    expect(frontLoadTransferN(1000, 4, 0.5, 2.5)).toBeLessThan(0);
  });

  it("balance, centre of pressure and centre of gravity by the lever rule", () => {
    // Lever rule (statics): a load split a/b acts b/(a+b)·L behind the front axle.
    expect(balanceFrontPct(0.4, 0.6)).toBeCloseTo(40, 12);
    expect(copFromFrontAxleMm(2500, 40)).toBeCloseTo(1500, 9);
    expect(cogFromFrontAxleMm(2500, 45)).toBeCloseTo(1375, 9);
  });

  it("ride height falls by damper travel / MR plus tyre deflection", () => {
    // Wheel travel = damper travel / MR (app/engine/README.md §1, Barton & Fieldhouse §3.9); tyre
    // deflection F/Kt. 6 mm of damper at MR 0.75 = 8 mm; 600 N on a 300 N/mm tyre = 2 mm.
    expect(rideHeightChangeMm(6, 0.75, 600, 300)).toBeCloseTo(-10, 12);
  });
});

describe("car file validation (clear messages)", () => {
  it("accepts a plausible car", () => {
    expect(validateCar(carFor()).name).toBe("Test car");
  });

  it("names the field and the range for a motion ratio of 7", () => {
    // Motion ratios of real installations lie well below 1.5 (common practice): 7 is a typing error.
    const bad = carFor({ front: { spring_rate_n_per_mm: 100, motion_ratio: 7 } });
    expect(() => validateCar(bad)).toThrow(EngineError);
    expect(() => validateCar(bad)).toThrow(/front\.motion_ratio must be a number from 0\.3 to 1\.5.*got 7/);
  });

  it("names a missing field and rejects text where a number belongs", () => {
    // A car file without a wheelbase cannot place the CoG (common practice: every lever arm needs L).
    const { wheelbase_mm: _w, ...noWheelbase } = carFor();
    expect(() => validateCar(noWheelbase)).toThrow(/wheelbase_mm is missing/);
    expect(() => validateCar({ ...carFor(), mass_kg: "620" })).toThrow(/mass_kg must be a number/);
    expect(() => validateCar({ ...carFor(), static_damper_mm: { fl: 1, fr: 2, rl: 3 } })).toThrow(/static_damper_mm\.rr is missing/);
  });

  it("names the row of a bump-stop table that cannot be a stop", () => {
    const withTable = (force_table: unknown) => ({ ...carFor(), rear: { spring_rate_n_per_mm: 140, motion_ratio: 0.85, bump_stop: { gap_mm: 12, rate_n_per_mm: 300, force_table } } });
    expect(validateCar(withTable([{ deflection_mm: 0, force_n: 0 }, { deflection_mm: 5, force_n: 1500 }])).rear.bump_stop!.force_table).toHaveLength(2);
    expect(() => validateCar(withTable([{ deflection_mm: 0, force_n: 0 }]))).toThrow(/rear\.bump_stop\.force_table needs at least two rows/);
    expect(() => validateCar(withTable([{ deflection_mm: 0, force_n: 0 }, { deflection_mm: 4, force_n: 800 }, { deflection_mm: 4, force_n: 900 }]))).toThrow(/rear\.bump_stop\.force_table\.2\.deflection_mm must be larger than the row before/);
    expect(() => validateCar(withTable([{ deflection_mm: 0, force_n: 500 }, { deflection_mm: 4, force_n: 100 }]))).toThrow(/force_table\.1\.force_n must not fall/);
    expect(() => validateCar(withTable([{ deflection_mm: 0, force_n: 0 }, { deflection_mm: 4, force_n: 0 }]))).toThrow(/zero force on every row/);
    expect(() => validateCar(withTable([{ deflection_mm: 0 }, { deflection_mm: 4, force_n: 10 }]))).toThrow(/force_table\.0\.force_n is missing/);
  });
});

describe("speed bands", () => {
  it("parses edges and puts a speed in the band [lo, hi)", () => {
    // km/h → m/s is exactly 1/3.6 (NIST SP 811).
    const edges = parseBandEdges("0,80,120,160,260");
    const ms = bandEdgesMs(edges);
    expect(bandIndex(ms, 79.99 / 3.6)).toBe(0);
    expect(bandIndex(ms, 80 / 3.6)).toBe(1);
    expect(bandIndex(ms, 300 / 3.6)).toBe(-1);
    expect(() => parseBandEdges("0,120,80")).toThrow(/must increase/);
    expect(() => parseBandEdges("0,fast")).toThrow(/comma-separated km\/h/);
  });
});

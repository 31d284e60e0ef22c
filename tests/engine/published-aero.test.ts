import { describe, expect, it } from "vitest";
import { dynamicPressurePa } from "~/engine/physics";
import { createSummaryBuilder } from "~/engine/summary";
import { carFor, emptyTrace, toBlocks } from "./summary-synthetic";

// Aero load scales with the square of speed, F = ClA·½ρV² (common practice: twice the speed, four
// times the load). Axle loads are turned into damper travel with ΔFw = Ks·MR·Δx (Barton & Fieldhouse,
// Automotive Chassis Engineering §3.9) and the engine must get them back.
const CLA_F = 0.5, CLA_R = 0.8, RHO = 1.225, AX = 3;

function twoSpeedRun(v1: number, v2: number, hz = 100) {
  const tr = emptyTrace();
  let t = 0;
  const hold = (v: number, seconds: number) => {
    for (let i = 0; i < seconds * hz; i++) {
      const q = dynamicPressurePa(RHO, v);
      tr.time.push(t); tr.speed.push(v); tr.ay.push(0); tr.ax.push(0); tr.steer.push(0);
      tr.loadFront.push(CLA_F * q); tr.loadRear.push(CLA_R * q);
      t += 1 / hz;
    }
  };
  hold(v1, 30);
  // Accelerate at 3 m/s² between the two speeds: the springs also see the longitudinal load
  // transfer ΔFz_front = −m·ax·h/L (statics of the pitching car), which the engine must remove.
  const car = carFor();
  const lt = (car.mass_kg * AX * car.cog_height_mm) / car.wheelbase_mm;
  for (let v = v1; v < v2; v += AX / hz) {
    const q = dynamicPressurePa(RHO, v);
    tr.time.push(t); tr.speed.push(v); tr.ay.push(0); tr.ax.push(AX); tr.steer.push(0);
    tr.loadFront.push(CLA_F * q - lt); tr.loadRear.push(CLA_R * q + lt);
    t += 1 / hz;
  }
  hold(v2, 30);
  return tr;
}

describe("aero load and the square of speed (common practice)", () => {
  it("q doubles twice over when the speed doubles", () => {
    // ½ρV²: 1.225 kg/m³ at 20 m/s → 245 Pa; at 40 m/s → 980 Pa.
    expect(dynamicPressurePa(RHO, 20)).toBeCloseTo(245, 9);
    expect(dynamicPressurePa(RHO, 40) / dynamicPressurePa(RHO, 20)).toBeCloseTo(4, 12);
  });

  it("twice the speed gives four times the axle aero load, and ClA and balance come back", () => {
    const car = carFor();
    // Bands that hold the two steady speeds (72 and 144 km/h); the acceleration lies between them.
    const b = createSummaryBuilder(car, { bandEdgesKmh: [0, 73, 143, 300] });
    for (const blk of toBlocks(twoSpeedRun(20, 40), car)) b.push(blk);
    const s = b.finish();
    const [slow, , fast] = s.bands;
    expect(fast.aero_load_front_n! / slow.aero_load_front_n!).toBeCloseTo(4, 2);
    expect(fast.aero_load_rear_n! / slow.aero_load_rear_n!).toBeCloseTo(4, 2);
    expect(s.aero.cla_front_m2!).toBeCloseTo(CLA_F, 3);
    expect(s.aero.cla_rear_m2!).toBeCloseTo(CLA_R, 3);
    // Balance = ClA_f/(ClA_f + ClA_r) = 0.5/1.3 = 38.46 % front (definition, app/engine/README.md §2).
    expect(s.aero.balance_front_pct!).toBeCloseTo(38.46, 1);
    expect(s.aero.model).toBe("through_origin");
  });

  it("CoP from the front axle is L·(1 − %F); positive margin when it lies behind the CoG", () => {
    // Lever rule on the axle loads (statics): a force split 38.46/61.54 acts 0.6154·L behind the front axle.
    const car = carFor({ wheelbase_mm: 2600, static_front_weight_pct: 55 });
    const b = createSummaryBuilder(car, { bandEdgesKmh: [0, 100, 200] });
    for (const blk of toBlocks(twoSpeedRun(20, 40), car)) b.push(blk);
    const s = b.finish();
    expect(s.cop.from_front_axle_mm!).toBeCloseTo(2600 * (0.8 / 1.3), -1);
    expect(s.cop.cog_from_front_axle_mm).toBeCloseTo(2600 * 0.45, 6);
    expect(s.cop.cop_behind_cog_mm!).toBeGreaterThan(0);
  });
});

describe("static damper readings learned from slow running (common practice: aero load = ClA·½ρV²)", () => {
  it("takes the slow running's own aero load out of the static estimate", () => {
    // No static readings in the car file: the engine learns them from running under 60 km/h, here
    // 10 s at 13 m/s (46.8 km/h), where q = ½·1.225·13² = 103.5 Pa already puts ClA_f·q/2 = 25.9 N
    // on each front wheel: 25.9 / (Ks·MR = 108 N/mm) = 0.24 mm of damper travel (0.24 mm rear too).
    const car = carFor({ static_damper_mm: undefined });
    const tr = emptyTrace();
    let t = 0, v = 13;
    const row = (ax: number) => {
      const q = dynamicPressurePa(RHO, v);
      const lt = (car.mass_kg * ax * car.cog_height_mm) / car.wheelbase_mm;
      tr.time.push(t); tr.speed.push(v); tr.ay.push(0); tr.ax.push(ax); tr.steer.push(0);
      tr.loadFront.push(CLA_F * q - lt); tr.loadRear.push(CLA_R * q + lt);
      t += 0.01;
    };
    for (let i = 0; i < 1000; i++) row(0);
    for (; v < 40; v += AX / 100) row(AX);
    for (let i = 0; i < 3000; i++) row(0);
    const b = createSummaryBuilder(car);
    for (const blk of toBlocks(tr, car)) b.push(blk);
    const s = b.finish();
    expect(s.aero.cla_front_m2!).toBeCloseTo(CLA_F, 3);
    const ref = s.static_damper_mm!;
    expect(ref.source).toBe("estimated");
    // toBlocks writes the static readings 30 / 31 / 40 / 41 mm.
    expect(ref.fl).toBeCloseTo(30, 1);
    expect(ref.fr).toBeCloseTo(31, 1);
    expect(ref.rl).toBeCloseTo(40, 1);
    expect(ref.rr).toBeCloseTo(41, 1);
    expect(Math.abs(ref.fl - 30)).toBeLessThan(0.03);
    expect(Math.abs(ref.rl - 40)).toBeLessThan(0.03);
  });
});

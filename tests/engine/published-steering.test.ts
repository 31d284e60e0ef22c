import { describe, expect, it } from "vitest";
import { characteristicSpeedMs, criticalSpeedMs, steadyStateSteerDeg, understeerGradientDegPerG } from "~/engine/physics";
import { createSummaryBuilder } from "~/engine/summary";
import { carFor, DEG, emptyTrace, G, toBlocks } from "./summary-synthetic";
import type { Trace } from "./summary-synthetic";

// A check computed by us from the steady-state cornering relations (Gillespie, Fundamentals of
// Vehicle Dynamics, SAE 1992, ch. 6, from memory); the car is ours, not an example from the book:
// 1300 kg, L 2.6 m, 55 % front, Cαf 120 kN/rad and Cαr 140 kN/rad per axle → K = Wf/Cαf − Wr/Cαr
// = 1.000 deg/g and V_char = √(57.3·L·g/K) = 38.22 m/s (both computed by us from the formulas).
const MASS = 1300, L = 2.6, WF = 0.55, CF = 120_000, CR = 140_000;

describe("steady-state steering relation (Gillespie ch. 6, from memory)", () => {
  it("understeer gradient and characteristic speed computed by us from the formulas", () => {
    const k = understeerGradientDegPerG(MASS * G * WF, MASS * G * (1 - WF), CF, CR);
    expect(k).toBeCloseTo(1.0, 3);
    expect(characteristicSpeedMs(L, k)!).toBeCloseTo(38.22, 2);
    expect(criticalSpeedMs(L, k)).toBeNull();
    // A neutral-steer car (K = 0) needs the Ackermann angle 57.3·L/R at any speed: 2.6 m on 50 m → 2.979°.
    expect(steadyStateSteerDeg(L, 50, 0, 1)).toBeCloseTo(2.979, 3);
    // At the characteristic speed the steer needed is twice the Ackermann angle (Gillespie ch. 6).
    const vc = characteristicSpeedMs(L, k)!;
    const r = 80;
    expect(steadyStateSteerDeg(L, r, k, (vc * vc) / r / G)).toBeCloseTo(2 * (DEG * L) / r, 6);
  });

  it("the engine recovers K = 1.000 deg/g from a constant-radius test built from the same relation", () => {
    // Constant-radius test (ISO 4138 method): radius 60 m, speed raised slowly, both directions,
    // after a straight that shows the steering-wheel offset.
    const k = understeerGradientDegPerG(MASS * G * WF, MASS * G * (1 - WF), CF, CR);
    const ratio = 14, offset = 2.5, radius = 60, hz = 100;
    const tr: Trace = emptyTrace();
    let t = 0;
    const push = (v: number, ay: number, ax: number, steer: number) => {
      tr.time.push(t); tr.speed.push(v); tr.ay.push(ay); tr.ax.push(ax); tr.steer.push(steer); tr.loadFront.push(0); tr.loadRear.push(0);
      t += 1 / hz;
    };
    for (let i = 0; i < 30 * hz; i++) push(30, 0, 0, offset);
    for (const dir of [1, -1]) {
      for (let i = 0; i < 3 * hz; i++) push(8, 0, 0, offset); // slow straight between the two runs
      const ramp = 80 * hz;
      for (let i = 0; i < ramp; i++) {
        const v = 8 + (18 * i) / ramp;
        const ay = (dir * v * v) / radius;
        push(v, ay, 18 / 80, ratio * steadyStateSteerDeg(L, dir * radius, k, ay / G) + offset);
      }
    }
    const car = carFor({ wheelbase_mm: 2600, mass_kg: MASS, static_front_weight_pct: 55, steering_ratio: ratio });
    const b = createSummaryBuilder(car, { bandEdgesKmh: [0, 300] });
    for (const blk of toBlocks(tr, car)) b.push(blk);
    const s = b.finish();
    expect(s.steering.offset_deg!).toBeCloseTo(offset, 3);
    expect(s.bands[0].understeer_gradient_deg_per_g!).toBeCloseTo(1.0, 2);
    const [lo, hi] = s.bands[0].understeer_ci95_deg_per_g!;
    expect(lo).toBeLessThanOrEqual(1.0 + 1e-3);
    expect(hi).toBeGreaterThanOrEqual(1.0 - 1e-3);
  });

  it("a yaw-rate channel gives the same K (curvature r/V instead of ay/V²)", () => {
    // Same Gillespie relation; steady state has r = V/R, so r/V = ay/V² = 1/R.
    const k = 1.0, ratio = 14, radius = 60, hz = 50;
    const tr: Trace = emptyTrace();
    const yaw: number[] = [];
    let t = 0;
    const push = (v: number, ay: number, r: number, steer: number) => {
      tr.time.push(t); tr.speed.push(v); tr.ay.push(ay); tr.ax.push(0.1); tr.steer.push(steer); tr.loadFront.push(0); tr.loadRear.push(0); yaw.push(r);
      t += 1 / hz;
    };
    for (let i = 0; i < 20 * hz; i++) push(30, 0, 0, 0);
    for (const dir of [1, -1]) for (let i = 0; i < 60 * hz; i++) {
      const v = 9 + (15 * i) / (60 * hz);
      push(v, (dir * v * v) / radius, (dir * v / radius) * DEG, ratio * steadyStateSteerDeg(L, dir * radius, k, (dir * v * v) / radius / G));
    }
    const car = carFor({ steering_ratio: ratio });
    const b = createSummaryBuilder(car, { bandEdgesKmh: [0, 300] });
    const blocks = toBlocks(tr, car);
    let r0 = 0;
    for (const blk of blocks) { blk.channels.yaw_rate = Float64Array.from(yaw.slice(r0, r0 + blk.rows)); r0 += blk.rows; b.push(blk); }
    const s = b.finish();
    expect(s.steering.curvature_source).toBe("yaw_rate");
    expect(s.bands[0].understeer_gradient_deg_per_g!).toBeCloseTo(1.0, 2);
  });
});

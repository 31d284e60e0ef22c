import { describe, expect, it } from "vitest";
import { createSummaryBuilder } from "~/engine/summary";
import type { SessionSummary } from "~/engine/summary";
import type { SummaryOptions } from "~/engine/summary-options";
import type { CarInput } from "~/engine/types";
import { Prng } from "../../sample-data/prng";
import { carFor, emptyTrace, G, toBlocks } from "./summary-synthetic";

// A car whose front aero is in ground effect: ClA_front = c0 + c1·h with h the front ride-height
// change (mm, negative = nose lower), so the balance moves forward as speed pulls the nose down.
// Ride height from the springs (wheel rate Kw = Ks·MR², Barton & Fieldhouse §3.9) in series with
// the tyre: h = −F_front/(2·Kw) − F_front/(2·Kt), solved with the aero that depends on it. Lap speeds
// drift by a few per cent over the stint while the fuel burns (static load falls, lever rule about
// each axle). Expected values are the model's own inputs, computed by us.
const RHO = 1.225, C0_F = 0.45, C1_F = -0.012, CLA_R = 0.75, KT = 300;
const LAP_S = 80;

interface Truth { bandF: number[]; bandR: number[]; bandN: number[]; hMin: number; hMax: number }

function groundEffectStint(car: CarInput, edgesKmh: number[], opts: { laps: number; hz: number; fuelStartKg: number; fuelEndKg: number; noiseN: number; seed: number }) {
  const tr = emptyTrace();
  const L = car.wheelbase_mm / 1000, x = car.fuel_tank_from_front_axle_mm! / 1000;
  const kw = car.front.spring_rate_n_per_mm * car.front.motion_ratio ** 2;
  const kappa = 1 / (1 / (2 * kw) + 1 / (2 * KT)); // N per mm of front ride height, both wheels
  const lt = (ax: number) => (car.mass_kg * ax * car.cog_height_mm) / car.wheelbase_mm;
  const n = opts.laps * LAP_S * opts.hz;
  const truth: Truth = { bandF: edgesKmh.slice(1).map(() => 0), bandR: edgesKmh.slice(1).map(() => 0), bandN: edgesKmh.slice(1).map(() => 0), hMin: Infinity, hMax: -Infinity };
  const rng = new Prng(opts.seed);
  const rand = () => rng.next();
  let noise = 0;
  const speed = (t: number) => {
    const lap = Math.floor(t / LAP_S), u = t - lap * LAP_S;
    // Later laps a little faster (lighter car, rubbered track): +4 % over the stint, ± 1 % lap to lap.
    const pace = 1 + (0.04 * lap) / opts.laps + 0.01 * Math.sin(2.3 * lap);
    return pace * (31 + 17 * Math.sin((2 * Math.PI * u) / 40) + 6 * Math.sin((2 * Math.PI * u) / 16));
  };
  for (let i = 0; i < n; i++) {
    const t = i / opts.hz;
    const v = speed(t);
    const ax = (speed(t + 0.01) - speed(t - 0.01)) / 0.02;
    const q = 0.5 * RHO * v * v;
    const burnt = ((opts.fuelStartKg - opts.fuelEndKg) * i) / (n - 1);
    const fuelF = -burnt * G * (1 - x / L), fuelR = -burnt * G * (x / L);
    // Front spring force S = aero(h) + fuel − lt; h = −S/κ  ⇒  h = −(q·c0 + fuel − lt)/(κ + q·c1).
    const h = -(q * C0_F + fuelF - lt(ax)) / (kappa + q * C1_F);
    const aeroF = (C0_F + C1_F * h) * q, aeroR = CLA_R * q;
    noise = 0.97 * noise + opts.noiseN * 0.243 * (rand() + rand() + rand() - 1.5) * 2; // ≈ AR(1) heave noise
    tr.time.push(t); tr.speed.push(v); tr.ax.push(ax); tr.ay.push(0); tr.steer.push(0);
    tr.loadFront.push(aeroF + fuelF - lt(ax) + noise);
    tr.loadRear.push(aeroR + fuelR + lt(ax) - 0.6 * noise);
    const kmh = v * 3.6;
    const b = edgesKmh.findIndex((e, k) => k < edgesKmh.length - 1 && kmh >= e && kmh < edgesKmh[k + 1]);
    if (b >= 0 && Math.abs(ax) <= 0.6 * G && kmh >= 20) { truth.bandF[b] += aeroF; truth.bandR[b] += aeroR; truth.bandN[b]++; }
    truth.hMin = Math.min(truth.hMin, h); truth.hMax = Math.max(truth.hMax, h);
  }
  return { tr, truth };
}

const EDGES = [0, 80, 120, 160, 260];
const car = carFor({ mass_kg: 700, fuel_tank_from_front_axle_mm: 1500, static_damper_mm: { fl: 30, fr: 31, rl: 40, rr: 41 } });

function analyse(tr: ReturnType<typeof groundEffectStint>["tr"], options: SummaryOptions): SessionSummary {
  const b = createSummaryBuilder(car, { bandEdgesKmh: EDGES, ...options });
  for (const blk of toBlocks(tr, car)) b.push(blk);
  return b.finish();
}

describe("aero that varies with ride height: balance per band and its shift", () => {
  const { tr, truth } = groundEffectStint(car, EDGES, { laps: 20, hz: 50, fuelStartKg: 60, fuelEndKg: 15, noiseN: 60, seed: 7 });
  const trueBal = truth.bandF.map((f, b) => (100 * f) / (f + truth.bandR[b]));
  const withFuel = analyse(tr, { fuel: { startKg: 60, endKg: 15 } });
  const without = analyse(tr, {});

  it.each([["with the fuel given", withFuel], ["with the fuel burn unannounced", without]] as const)("band balance within 1 point and the shift within 0.75 point, %s", (_name, s) => {
    const checked: number[] = [];
    s.bands.forEach((band, b) => {
      if (truth.bandN[b] < 50 * 60 || b === 0) return; // bands with a minute of running, above 80 km/h
      expect(band.balance_front_pct).not.toBeNull();
      expect(Math.abs(band.balance_front_pct! - trueBal[b])).toBeLessThan(1);
      checked.push(b);
    });
    expect(checked.length).toBeGreaterThanOrEqual(2);
    const shift = s.aero.balance_shift!;
    const lo = EDGES.indexOf(shift.low_band_kmh[0]), hi = EDGES.indexOf(shift.high_band_kmh[0]);
    expect(Math.abs(shift.points - (trueBal[hi] - trueBal[lo]))).toBeLessThan(0.75);
    // CoP from the front axle = L·(1 − balance): a forward shift of p points is L·p/100 mm forward.
    expect(shift.cop_shift_mm).toBeCloseTo((car.wheelbase_mm * shift.points) / 100, 0);
    expect(s.aero.variation_model).not.toBe("constant");
  });

  it("reports the sensitivity to front ride height with an interval that holds the truth", () => {
    const sens = withFuel.aero.ride_height_sensitivity!;
    expect(sens).not.toBeNull();
    // d(ClA_total)/dh = c1 (the rear does not depend on h here).
    expect(sens.cla_total_ci95_m2_per_mm![0]).toBeLessThan(C1_F);
    expect(sens.cla_total_ci95_m2_per_mm![1]).toBeGreaterThan(C1_F);
    expect(Math.abs(sens.cla_total_m2_per_mm - C1_F)).toBeLessThan(0.0015);
    // Balance per mm at the headline ClA: 100·(c1·ClA_r)/ClA_total² (the rear does not move).
    const cf = withFuel.aero.cla_front_m2!, cr = withFuel.aero.cla_rear_m2!;
    expect(sens.balance_pct_per_mm).toBeCloseTo((100 * C1_F * cr) / (cf + cr) ** 2, 1);
  });
});

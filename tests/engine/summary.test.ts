import { describe, expect, it } from "vitest";
import { createSummaryBuilder } from "~/engine/summary";
import type { SessionSummary } from "~/engine/summary";
import type { CarInput, ChannelBlock } from "~/engine/types";
import { carFor, emptyTrace, G, toBlocks } from "./summary-synthetic";
import type { Trace } from "./summary-synthetic";

// Synthetic stint: speed swinging 15–55 m/s; spring loads = ClA·½ρV² − m·ax·h/L at the front and
// + at the rear (aero square law, common practice; longitudinal load transfer, Gillespie ch. 2 from
// memory), turned into damper travel with ΔFw = Ks·MR·Δx (Barton & Fieldhouse §3.9).
const CLA_F = 0.45, CLA_R = 0.75, RHO = 1.225;

function stint(car: CarInput, seconds = 300, hz = 100, extra?: (t: number, tr: Trace) => void): Trace {
  const tr = emptyTrace();
  const lt = (ax: number) => (car.mass_kg * ax * car.cog_height_mm) / car.wheelbase_mm;
  for (let i = 0; i < seconds * hz; i++) {
    const t = i / hz;
    const w = (2 * Math.PI) / 40;
    const v = 35 + 20 * Math.sin(w * t);
    const ax = 20 * w * Math.cos(w * t);
    const q = 0.5 * RHO * v * v;
    tr.time.push(t); tr.speed.push(v); tr.ax.push(ax); tr.ay.push(0); tr.steer.push(0);
    tr.loadFront.push(CLA_F * q - lt(ax)); tr.loadRear.push(CLA_R * q + lt(ax));
    extra?.(t, tr);
  }
  return tr;
}

function run(car: CarInput, blocks: ChannelBlock[], bands?: number[]): SessionSummary {
  const b = createSummaryBuilder(car, bands ? { bandEdgesKmh: bands } : {});
  for (const blk of blocks) b.push(blk);
  return b.finish();
}

function hasNaN(v: unknown): boolean {
  if (typeof v === "number") return !Number.isFinite(v);
  if (Array.isArray(v)) return v.some(hasNaN);
  if (v && typeof v === "object") return Object.values(v).some(hasNaN);
  return false;
}

describe("streaming summary", () => {
  const car = carFor();
  const tr = stint(car);

  it("recovers ClA per axle and the balance from corrected accelerating samples", () => {
    // Expected values are the inputs of the square-law model above.
    const s = run(car, toBlocks(tr, car));
    expect(s.aero.cla_front_m2!).toBeCloseTo(CLA_F, 3);
    expect(s.aero.cla_rear_m2!).toBeCloseTo(CLA_R, 3);
    expect(s.aero.balance_front_pct!).toBeCloseTo((100 * CLA_F) / (CLA_F + CLA_R), 1);
    expect(s.summary_version).toBe(2);
  });

  it("carries the usual cautions and what the method assumes, for every screen that shows its figures", () => {
    // The cautions of the trade (common practice): estimates, not margins; one change at a time;
    // the series' regulations and qualified engineers have the last word.
    const s = run(car, toBlocks(tr, car));
    expect(s.cautions.join(" ")).toMatch(/not safety margins/);
    expect(s.cautions.join(" ")).toMatch(/technical regulations/);
    expect(s.cautions.join(" ")).toMatch(/qualified engineers/);
    // Ground speed stands in for airspeed (no pitot channel), so wind is named as an error source.
    expect(s.notes.join(" ")).toMatch(/ground speed.*wind/);
  });

  it("does not depend on how the rows are split into blocks", () => {
    // Common practice: a streaming computation must give the same answer for any chunking.
    const a = run(car, toBlocks(tr, car, 4096));
    const b = run(car, toBlocks(tr, car, 7));
    // Rounding inside block-local sums may differ in the last bits, never beyond the stored digits.
    const figures = (s: SessionSummary) => [s.samples, s.aero.cla_front_m2, s.aero.cla_rear_m2, s.aero.balance_front_pct, s.aero.samples, s.cop.cop_behind_cog_mm,
      ...s.bands.flatMap((x) => [x.samples, x.aero_samples, x.aero_load_front_n, x.aero_load_rear_n])];
    const fa = figures(a), fb = figures(b);
    fa.forEach((v, i) => expect(fb[i]).toBeCloseTo(v as number, 3));
    expect(b.warnings.map((w) => w.code)).toEqual(a.warnings.map((w) => w.code));
  });

  it("is plain JSON with no NaN, and keeps the traces to the bucket budget with peaks intact", () => {
    // Common practice for chart decimation: min/max per bucket keeps a one-sample spike visible.
    const spiky = stint(car);
    spiky.steer[12_345] = 400;
    const s = run(car, toBlocks(spiky, car));
    expect(JSON.parse(JSON.stringify(s))).toEqual(s);
    expect(hasNaN(s)).toBe(false);
    const steer = s.traces.channels.steer_deg;
    expect(s.traces.t_s.length).toBeLessThanOrEqual(2048);
    expect(s.traces.t_s.length).toBeGreaterThan(1000);
    expect(Math.max(...steer.max.map((v) => v ?? -Infinity))).toBe(400);
  });

  it("gives null with a reason when a figure cannot be estimated", () => {
    // No cornering at all: an understeer gradient cannot be estimated (SAE J670 defines it in turns).
    const s = run(car, toBlocks(tr, car));
    for (const band of s.bands) expect(band.understeer_gradient_deg_per_g).toBeNull();
    expect(s.warnings.some((w) => w.code === "few_understeer_samples")).toBe(true);
    // A 10 s log has too little running for a ClA fit.
    const short = run(car, toBlocks(stint(car, 8), car));
    expect(short.aero.cla_front_m2).toBeNull();
    expect(short.cop.from_front_axle_mm).toBeNull();
    expect(short.warnings.some((w) => w.code === "few_aero_samples")).toBe(true);
  });

  it("flags front dampers logged with the wrong sign", () => {
    // Braking compresses the front springs (load transfer, Gillespie ch. 2, from memory).
    const blocks = toBlocks(tr, car);
    for (const b of blocks) for (const k of ["damper_fl", "damper_fr"] as const) b.channels[k] = b.channels[k]!.map((x) => -x);
    const s = run(car, blocks);
    expect(s.warnings.some((w) => w.code === "suspected_sign_error" && /front/.test(w.message))).toBe(true);
  });

  it("models a linear static-load drift (fuel burn) and keeps ClA unbiased", () => {
    // 0.74 kg/L petrol: 10 L ≈ 72.6 N of static load over the stint (common practice figure).
    const burnN = 10 * 0.74 * G;
    const drifting = stint(car, 300, 100, (t, x) => {
      const i = x.loadFront.length - 1;
      x.loadFront[i] -= 0.4 * burnN * (t / 300);
      x.loadRear[i] -= 0.6 * burnN * (t / 300);
    });
    const s = run(car, toBlocks(drifting, car));
    expect(s.aero.fuel_drift_modelled).toBe(true);
    expect(s.aero.cla_front_m2!).toBeCloseTo(CLA_F, 3);
    expect(s.aero.rear.static_load_change_over_stint_n!).toBeCloseTo(-0.6 * burnN, -1);
    expect(s.warnings.some((w) => w.code === "static_load_drift")).toBe(true);
  });

  it("models bump-stop contact and reports its share", () => {
    // Piecewise spring: past the gap the stop adds Kbs·MR·(x − gap) (common practice).
    const bumpCar = carFor({ front: { spring_rate_n_per_mm: 120, motion_ratio: 0.9, bump_stop: { gap_mm: 3, rate_n_per_mm: 300 } } });
    const blocks = toBlocks(tr, bumpCar);
    const k = 120 * 0.9, kb = 300 * 0.9;
    let r0 = 0;
    for (const b of blocks) {
      for (const [c, st] of [["damper_fl", 30], ["damper_fr", 31]] as const) {
        const x = b.channels[c]!;
        for (let i = 0; i < b.rows; i++) {
          const f = tr.loadFront[r0 + i] / 2;
          x[i] = st + (f / k <= 3 ? f / k : 3 + (f - 3 * k) / (k + kb));
        }
      }
      r0 += b.rows;
    }
    const s = run(bumpCar, blocks);
    expect(s.aero.cla_front_m2!).toBeCloseTo(CLA_F, 2);
    expect(s.aero.bump_stop_contact_front_pct!).toBeGreaterThan(10);
    expect(s.warnings.some((w) => w.code === "bump_stop_contact")).toBe(true);
  });

  it("models a progressive bump stop from its force/deflection table", () => {
    // A rubber stop stiffening with depth (common practice), at the damper: 150 N/mm over the first
    // 2 mm, 450 N/mm over the next 2, 900 N/mm beyond. The wheel sees MR × that force (virtual work,
    // Barton & Fieldhouse §3.9). Dampers are written by solving Ks·MR·x + MR·F(x − gap) = F_wheel.
    const table = [{ deflection_mm: 0, force_n: 0 }, { deflection_mm: 2, force_n: 300 }, { deflection_mm: 4, force_n: 1200 }, { deflection_mm: 8, force_n: 4800 }];
    const gap = 2, ks = 120, mr = 0.9;
    const stopForce = (d: number) => {
      if (d <= 0) return 0;
      let i = 1;
      while (i < table.length - 1 && table[i].deflection_mm < d) i++;
      const a = table[i - 1], b = table[i];
      return a.force_n + ((d - a.deflection_mm) * (b.force_n - a.force_n)) / (b.deflection_mm - a.deflection_mm);
    };
    const travelFor = (fWheel: number) => {
      let lo = -50, hi = 50;
      for (let k = 0; k < 80; k++) {
        const x = (lo + hi) / 2;
        if (ks * mr * x + mr * stopForce(x - gap) < fWheel) lo = x; else hi = x;
      }
      return (lo + hi) / 2;
    };
    const leastSquaresRate = table.reduce((s, r) => s + r.force_n * r.deflection_mm, 0) / table.reduce((s, r) => s + r.deflection_mm ** 2, 0);
    const tabled = carFor({ front: { spring_rate_n_per_mm: ks, motion_ratio: mr, bump_stop: { gap_mm: gap, rate_n_per_mm: leastSquaresRate, force_table: table } } });
    const blocks = toBlocks(tr, tabled);
    let r0 = 0;
    for (const b of blocks) {
      for (const [c, st] of [["damper_fl", 30], ["damper_fr", 31]] as const) {
        const x = b.channels[c]!;
        for (let i = 0; i < b.rows; i++) x[i] = st + travelFor(tr.loadFront[r0 + i] / 2);
      }
      r0 += b.rows;
    }
    const s = run(tabled, blocks);
    expect(s.aero.bump_stop_contact_front_pct!).toBeGreaterThan(10);
    expect(s.aero.cla_front_m2!).toBeCloseTo(CLA_F, 3);
    // The same log read with only the table's least-squares rate misses the curve's shape.
    const { force_table: _t, ...linearStop } = tabled.front.bump_stop!;
    const linear = run({ ...tabled, front: { ...tabled.front, bump_stop: linearStop } }, blocks);
    expect(Math.abs(linear.aero.cla_front_m2! - CLA_F)).toBeGreaterThan(10 * Math.abs(s.aero.cla_front_m2! - CLA_F));
  });

  it("survives dropouts (NaN cells) without zeros leaking in", () => {
    // NaN = dropout convention (DEVELOPERS.md); a zero would read as a 30 mm extension.
    const blocks = toBlocks(tr, car);
    let n = 0;
    for (const b of blocks) for (let i = 0; i < b.rows; i += 97) { b.channels.damper_fl![i] = NaN; b.channels.speed![(i + 13) % b.rows] = NaN; n++; }
    expect(n).toBeGreaterThan(100);
    const s = run(car, blocks);
    expect(s.aero.cla_front_m2!).toBeCloseTo(CLA_F, 2);
    expect(hasNaN(s)).toBe(false);
  });
});

// Constant-radius cornering from the steady-state relation δ = 57.3·L/R + K·ay (Gillespie,
// Fundamentals of Vehicle Dynamics ch. 6, from memory), both directions, no straights.
function cornering(car: CarInput, k: number, offsetDeg: number, radius = 60, hz = 50): Trace {
  const tr = emptyTrace();
  const l = car.wheelbase_mm / 1000;
  let t = 0;
  for (const dir of [1, -1]) for (let i = 0; i < 60 * hz; i++) {
    const v = 9 + (15 * i) / (60 * hz);
    const ay = (dir * v * v) / radius;
    const road = (57.29578 * l) / (dir * radius) + k * (ay / G);
    tr.time.push(t); tr.speed.push(v); tr.ay.push(ay); tr.ax.push(0.05); tr.steer.push(car.steering_ratio * road + offsetDeg);
    tr.loadFront.push(0); tr.loadRear.push(0);
    t += 1 / hz;
  }
  return tr;
}

describe("steering offset and sign checks", () => {
  const car = carFor();

  it("without straights, finds the offset from corners of both directions and says so", () => {
    // K = 1.2 deg/g and a 3° offset are the inputs of the Gillespie relation above.
    const s = run(car, toBlocks(cornering(car, 1.2, 3), car), [0, 300]);
    expect(s.steering.offset_source).toBe("corners");
    expect(s.steering.offset_deg!).toBeCloseTo(3, 1);
    expect(s.bands[0].understeer_gradient_deg_per_g!).toBeCloseTo(1.2, 2);
    expect(s.warnings.map((w) => w.code)).toContain("steering_offset_from_corners");
  });

  it("flags steering logged with the opposite sign to lateral acceleration", () => {
    // ISO 8855 axes: a left turn has positive steer and positive lateral acceleration.
    const tr = cornering(car, 1.2, 0);
    tr.steer = tr.steer.map((x) => -x);
    const s = run(car, toBlocks(tr, car), [0, 300]);
    expect(s.warnings.some((w) => w.code === "suspected_sign_error" && /steering/.test(w.message))).toBe(true);
  });

  it("names the bands the car never reached", () => {
    // Bands are [lo, hi) in km/h; a 9–24 m/s run (32–86 km/h) never reaches 200 km/h.
    const s = run(car, toBlocks(cornering(car, 1.2, 0), car), [0, 100, 200, 300]);
    expect(s.bands[2].samples).toBe(0);
    expect(s.bands[2].understeer_gradient_deg_per_g).toBeNull();
    expect(s.warnings.find((w) => w.code === "empty_band")!.message).toMatch(/200–300/);
  });
});

// The Balance report's one-sentence verdict and its advice on made-up summaries: the rules are ours
// (issue 11), the geometry under them is the moment balance about the front axle, CoP = L·(1 − balance)
// (statics; common practice for aero balance, e.g. Katz, "Race Car Aerodynamics", ch. 1, from memory).
import { describe, expect, it } from "vitest";
import type { BandSummary, BalanceShift } from "~/engine/summary-types";
import { copPlacement, sideOfZero, verdictSentence, type VerdictSummary } from "~/lib/report/verdict";
import { adviceFor, understeerChangeWithSpeed } from "~/lib/report/advice";

function band(min: number, max: number, balance: number | null, ci: [number, number] | null, k: number | null = null, kCi: [number, number] | null = null): BandSummary {
  return {
    min_kmh: min, max_kmh: max, samples: 1000, aero_samples: 800, mean_dynamic_pressure_pa: 1000, aero_load_front_n: 400, aero_load_rear_n: 600,
    balance_front_pct: balance, balance_front_ci95_pct: ci, aero_blocks: 20, cla_front_m2: 0.4, cla_rear_m2: 0.6,
    understeer_gradient_deg_per_g: k, understeer_ci95_deg_per_g: kCi, understeer_samples: 500, understeer_blocks: 10, understeer_lat_g_range: null,
    ride_height_change_front_mm: null, ride_height_change_rear_mm: null, rake_change_mm: null, ride_height_front_mm: null, ride_height_rear_mm: null, rake_mm: null,
    duration_s: 10, mean_speed_kmh: (min + max) / 2, cla_front_ci95_m2: null, cla_rear_ci95_m2: null, cop_from_front_axle_mm: null, cop_behind_cog_mm: null, steady_cornering_s: 10,
  };
}

// Wheelbase 2500 mm, CoG 1500 mm behind the front axle (40 % static front).
function summary(bands: BandSummary[], shift: BalanceShift | null, balance: number | null = 40, ci: [number, number] | null = [39.5, 40.5]): VerdictSummary {
  return {
    car: { name: "Test car", wheelbase_mm: 2500 } as VerdictSummary["car"],
    cop: { from_front_axle_mm: null, cog_from_front_axle_mm: 1500, cop_behind_cog_mm: null },
    bands,
    aero: { balance_front_pct: balance, balance_front_ci95_pct: ci, balance_shift: shift } as VerdictSummary["aero"],
  };
}

describe("interval side of zero", () => {
  it("names above, below and spanning intervals", () => {
    expect(sideOfZero([0.1, 2])).toBe("above");
    expect(sideOfZero([-2, -0.1])).toBe("below");
    expect(sideOfZero([-0.1, 2])).toBe("spans");
    expect(sideOfZero(null)).toBe("spans");
  });
});

describe("CoP against CoG", () => {
  it("places the CoP from the balance: 38 % front on 2500 mm is 1550 mm from the front axle, 50 mm behind a CoG at 1500 mm", () => {
    // 2500 × (1 − 0.38) = 1550; the interval 37.6–38.4 % → 1560 … 1540 mm → 40 … 60 mm behind (computed by hand).
    const p = copPlacement(2500, 1500, 38, [37.6, 38.4]);
    expect(p.behindMm).toBeCloseTo(50, 9);
    expect(p.behindCi95Mm![0]).toBeCloseTo(40, 9);
    expect(p.behindCi95Mm![1]).toBeCloseTo(60, 9);
    expect(p.side).toBe("behind");
  });
  it("calls the CoP ahead when the whole interval lies ahead, and undecided when it straddles the CoG", () => {
    expect(copPlacement(2500, 1500, 42, [41.5, 42.5]).side).toBe("ahead");
    expect(copPlacement(2500, 1500, 40.2, [39.5, 40.9]).side).toBe("at");
  });
});

describe("verdict sentence", () => {
  it("states a clear forward shift in points and CoP millimetres, and where the high-speed CoP sits", () => {
    const s = summary([band(80, 120, 36, [35.5, 36.5]), band(160, 200, 38.8, [38.4, 39.2])], {
      low_band_kmh: [80, 120], high_band_kmh: [160, 200], points: 2.8, ci95_points: [2.2, 3.4], cop_shift_mm: 70, cop_shift_ci95_mm: [55, 85],
    });
    // high band: 2500 × (1 − 0.388) = 1530 → 30 mm behind the CoG; interval 1520–1540 mm → 20–40 mm behind.
    expect(verdictSentence(s)).toBe("Balance moves 2.8 points forward from 80–120 km/h to 160–200 km/h (CoP 70 mm forward); at high speed the CoP sits 30 mm behind the CoG.");
  });
  it("says rearward when the interval lies below zero", () => {
    const s = summary([band(80, 120, 40, [39.8, 40.2]), band(160, 200, 38, [37.8, 38.2])], {
      low_band_kmh: [80, 120], high_band_kmh: [160, 200], points: -2, ci95_points: [-2.3, -1.7], cop_shift_mm: -50, cop_shift_ci95_mm: [-57, -43],
    });
    expect(verdictSentence(s)).toMatch(/^Balance moves 2\.0 points rearward from 80–120 km\/h to 160–200 km\/h \(CoP 50 mm rearward\)/);
  });
  it("says 'no clear change' when the shift's interval spans zero, even with a sizeable point estimate", () => {
    const s = summary([band(80, 120, 38, [36, 40]), band(200, 300, 39.5, [37, 42])], {
      low_band_kmh: [80, 120], high_band_kmh: [200, 300], points: 1.5, ci95_points: [-1.2, 4.2], cop_shift_mm: 37.5, cop_shift_ci95_mm: [-30, 105],
    });
    const text = verdictSentence(s);
    expect(text).toMatch(/^No clear change in balance from 80–120 km\/h to 200–300 km\/h/);
    expect(text).not.toMatch(/moves/);
    // the high band's CoP interval (1450–1575 mm) straddles the CoG at 1500 mm
    expect(text).toMatch(/CoP is not clearly ahead of or behind the CoG/);
  });
  it("says the CoP sits ahead of the CoG when the high band's whole interval is ahead", () => {
    const s = summary([band(80, 120, 41, [40.8, 41.2]), band(160, 200, 42, [41.8, 42.2])], {
      low_band_kmh: [80, 120], high_band_kmh: [160, 200], points: 1, ci95_points: [0.7, 1.3], cop_shift_mm: 25, cop_shift_ci95_mm: [17, 33],
    });
    // 2500 × (1 − 0.42) = 1450 → 50 mm ahead
    expect(verdictSentence(s)).toMatch(/at high speed the CoP sits 50 mm ahead of the CoG\.$/);
  });
  it("falls back to the stint's balance without a shift, and to a plain statement without any balance", () => {
    expect(verdictSentence(summary([band(80, 120, 40, null)], null, 39, [38.8, 39.2]))).toBe(
      "Aero balance 39.0 % front over the stint; too few speed bands with aero load to say how it moves with speed; over the stint the CoP sits 25 mm behind the CoG.",
    );
    expect(verdictSentence(summary([], null, null, null))).toMatch(/^Not enough fast running to place the aero balance/);
  });
});

describe("advice", () => {
  it("names high-speed understeer when the gradient rises clearly with speed, and points the CoP forward", () => {
    const s = summary([band(80, 120, 38, [37.8, 38.2], 0.8, [0.75, 0.85]), band(160, 200, 38, [37.8, 38.2], 1.2, [1.1, 1.3])], null);
    // change 0.4, half-width √(0.05² + 0.1²) = 0.1118 → 0.288 … 0.512 (computed by hand)
    const k = understeerChangeWithSpeed(s.bands)!;
    expect(k.change).toBeCloseTo(0.4, 9);
    expect(k.ci95[0]).toBeCloseTo(0.28820, 4);
    const advice = adviceFor(s);
    expect(advice.map((a) => a.problem)).toEqual(["high_speed_understeer"]);
    expect(advice[0].direction).toMatch(/move the CoP forward/);
    expect(advice[0].source).toBe("common practice");
  });
  it("names high-speed oversteer when the gradient falls clearly, and points the CoP rearward", () => {
    const s = summary([band(80, 120, 38, [37.8, 38.2], 1.0, [0.95, 1.05]), band(160, 200, 38, [37.8, 38.2], 0.4, [0.3, 0.5])], null);
    expect(adviceFor(s).map((a) => a.problem)).toEqual(["high_speed_oversteer"]);
    expect(adviceFor(s)[0].direction).toMatch(/move the CoP rearward/);
  });
  it("gives no advice when the gradient change is within the noise and the CoP is behind the CoG", () => {
    const s = summary([band(80, 120, 38, [37.8, 38.2], 0.8, [0.5, 1.1]), band(160, 200, 38, [37.8, 38.2], 0.9, [0.6, 1.2])], null);
    expect(adviceFor(s)).toEqual([]);
  });
  it("stays quiet about a clear but tiny gradient change (under our 0.1 deg/g threshold)", () => {
    const s = summary([band(80, 120, 38, [37.8, 38.2], 0.82, [0.818, 0.822]), band(160, 200, 38, [37.8, 38.2], 0.78, [0.778, 0.782])], null);
    expect(understeerChangeWithSpeed(s.bands)!.ci95[1]).toBeLessThan(0);
    expect(adviceFor(s)).toEqual([]);
  });
  it("warns when the fastest band's CoP is wholly ahead of the CoG", () => {
    const s = summary([band(80, 120, 41, [40.8, 41.2]), band(160, 200, 42, [41.8, 42.2])], null);
    expect(adviceFor(s).map((a) => a.problem)).toEqual(["cop_ahead_of_cog"]);
  });
});

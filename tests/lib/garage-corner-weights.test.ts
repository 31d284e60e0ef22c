import { describe, expect, it } from "vitest";
import { cogFromFrontAxleMm, summariseCornerWeights, withFuelChange } from "~/lib/garage/corner-weights";

// Worked examples computed by hand from the static moment balance about the front axle
// (statics: W_rear · L = W · a, so a = L · W_rear / W; common practice for corner-weight sheets).
describe("corner weights", () => {
  it("club sports-racer on the scales", () => {
    // FL 150, FR 155, RL 160, RR 155 kg
    // total = 150 + 155 + 160 + 155 = 620 kg
    // front = 305 kg → 305 / 620 = 0.491935… → 49.1935 %
    // rear = 315 kg → CoG from front axle = 2450 mm × 315 / 620 = 771 750 / 620 = 1244.7581 mm
    // cross (FR + RL) = 315 / 620 = 50.8065 %; left (FL + RL) = 310 / 620 = 50 %
    const s = summariseCornerWeights({ fl: 150, fr: 155, rl: 160, rr: 155 }, 2450);
    expect(s.totalKg).toBe(620);
    expect(s.staticFrontPct).toBeCloseTo(49.1935, 4);
    expect(s.cogFromFrontAxleMm).toBeCloseTo(1244.7581, 4);
    expect(s.crossPct).toBeCloseTo(50.8065, 4);
    expect(s.leftPct).toBeCloseTo(50, 10);
  });

  it("closed GT, front-heavy", () => {
    // FL 380, FR 372, RL 300, RR 298 kg → total 1350 kg, front 752 kg
    // static front = 752 / 1350 = 55.7037 %; rear fraction = 598 / 1350 = 0.442963
    // CoG from front axle = 2600 × 0.442963 = 1151.7037 mm
    // cross (FR + RL) = 672 / 1350 = 49.7778 %
    const s = summariseCornerWeights({ fl: 380, fr: 372, rl: 300, rr: 298 }, 2600);
    expect(s.staticFrontPct).toBeCloseTo(55.7037, 4);
    expect(s.cogFromFrontAxleMm).toBeCloseTo(1151.7037, 4);
    expect(s.crossPct).toBeCloseTo(49.7778, 4);
  });

  it("CoG from a stated front % equals L × (1 − front fraction)", () => {
    // 2600 mm × (1 − 0.55) = 1170 mm
    expect(cogFromFrontAxleMm(2600, 55)).toBeCloseTo(1170, 9);
  });

  it("fuel added ahead of the rear axle shares its mass by the lever rule", () => {
    // 40 L × 0.745 kg/L = 29.8 kg (petrol density: common practice, from memory)
    // tank 1500 mm behind the front axle, L = 2450: front share = 29.8 × (2450 − 1500) / 2450 = 11.5551 kg
    // front = 620 × 0.491935 + 11.5551 = 305 + 11.5551 = 316.5551 kg; total = 649.8 kg → 48.7158 %
    const r = withFuelChange({
      massKg: 620,
      staticFrontPct: (305 / 620) * 100,
      wheelbaseMm: 2450,
      fuelChangeL: 40,
      fuelDensityKgPerL: 0.745,
      tankFromFrontAxleMm: 1500,
    });
    expect(r.fuelMassChangeKg).toBeCloseTo(29.8, 10);
    expect(r.massKg).toBeCloseTo(649.8, 10);
    expect(r.staticFrontPct).toBeCloseTo(48.7158, 4);
  });
});

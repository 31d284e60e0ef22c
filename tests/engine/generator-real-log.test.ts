import { describe, expect, it } from "vitest";
import { exportColumns, LOGS } from "../../sample-data/generate";
import { MARLIN_SR2_SPLITTER, KESTREL_BANK } from "../../sample-data/scenario";
import { simulateStint } from "../../sample-data/sim";

// The simulator's real-log options do what they say (their truths feed truth-real-log.test.ts).
const base = { laps: 1, rateHz: 50, seed: 5, airDensityKgM3: 1.225, bandEdgesKmh: [0, 80, 120, 160, 200, 300] };

describe("simulator options for real-log effects", () => {
  it("damper readings come in the logger's steps", () => {
    const { columns } = simulateStint(MARLIN_SR2_SPLITTER, KESTREL_BANK, { ...base, damperStepMm: 0.1 });
    for (const x of columns.damper_fl.subarray(0, 5000)) expect(Math.abs(x * 10 - Math.round(x * 10))).toBeLessThan(1e-9);
  });

  it("rows the logger never wrote leave gaps of two sample periods in time", () => {
    const spec = { ...LOGS.find((l) => l.file === "marlin-kestrel-splitter.csv")!, laps: 1, droppedRows: 0.01 };
    const { columns } = simulateStint(spec.car, spec.track, { ...base, rateHz: spec.rateHz, seed: spec.seed });
    const time = exportColumns(spec, columns).find((c) => c.name === "Elapsed")!.values;
    const dropped = columns.time.length - time.length;
    // About 1 % of the rows (binomial spread; our bar 0.5–1.5 %).
    expect(dropped / columns.time.length).toBeGreaterThan(0.005);
    expect(dropped / columns.time.length).toBeLessThan(0.015);
    let gaps = 0;
    for (let i = 1; i < time.length; i++) if (time[i] - time[i - 1] > 1.5 / spec.rateHz) gaps++;
    expect(gaps).toBeGreaterThan(0.8 * dropped);
  });

  it("a rising motion ratio reads less damper travel for the same load (wheel force Ks·MR·x·(1 + r·x))", () => {
    const plain = simulateStint(MARLIN_SR2_SPLITTER, KESTREL_BANK, { ...base, roadNoiseMm: 0, bodyNoiseMm: 0, damperNoiseMm: 0, kerbs: false });
    const rising = simulateStint(MARLIN_SR2_SPLITTER, KESTREL_BANK, { ...base, roadNoiseMm: 0, bodyNoiseMm: 0, damperNoiseMm: 0, kerbs: false, motionRatioRisePerMm: 0.004 });
    const st = MARLIN_SR2_SPLITTER.staticDamperMm.fl;
    // Where the linear spring reads x (no bump stop yet), the rising ratio reads (−1 + √(1 + 4r·x))/(2r) (computed by us).
    let checked = 0;
    for (let i = 0; i < plain.columns.time.length; i += 97) {
      const x = plain.columns.damper_fl[i] - st;
      if (!(x > 2 && x < MARLIN_SR2_SPLITTER.front.bumpGapMm)) continue;
      expect(rising.columns.damper_fl[i] - st).toBeCloseTo((-1 + Math.sqrt(1 + 4 * 0.004 * x)) / (2 * 0.004), 6);
      checked++;
    }
    expect(checked).toBeGreaterThan(5);
  });
});

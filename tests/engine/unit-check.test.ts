import { describe, expect, it } from "vitest";
import { damperRangeProblem, latAccelScaleProblem, longAccelScaleProblem, sampleRateProblem, steerScaleProblem } from "~/engine/unit-check";

// Kinematics: long_accel is dv/dt, so σ(long_accel)/σ(dv/dt) is 1 with the right units; the usual
// mapping slips give the exact NIST SP 811 factors: g = 9.80665 m/s², km/h = 1/3.6 m/s,
// mph = 0.44704 m/s (so km/h/mph = 1.609344).
describe("long_accel against the change of speed", () => {
  it("agrees within noise, grade and slip", () => {
    for (const scale of [1, 0.75, 0.95, 1.3]) expect(longAccelScaleProblem(scale)).toBeNull();
    expect(longAccelScaleProblem(NaN)).toBeNull();
  });

  it.each([
    [9.80665, /logged in m\/s² but mapped as g/, false],
    [1 / 9.80665, /logged in g but mapped as m\/s²/, false],
    [3.6, /speed is probably logged in m\/s but mapped as km\/h/, true],
    [1 / 3.6, /speed is probably logged in km\/h but mapped as m\/s/, true],
    [1.609344, /speed is probably logged in mph but mapped as km\/h/, true],
    [1 / 1.609344, /speed is probably logged in km\/h but mapped as mph/, true],
    [1 / 0.44704, /speed is probably logged in m\/s but mapped as mph/, true],
    [0.44704, /speed is probably logged in mph but mapped as m\/s/, true],
  ])("a factor of %f names its slip", (scale, message, speed) => {
    // Noise moves the measured ratio a little: ±8 % still finds the same slip.
    for (const k of [1, 0.92, 1.08]) {
      const p = longAccelScaleProblem((scale as number) * k);
      expect(p?.problem).toMatch(message as RegExp);
      expect(p?.speed).toBe(speed);
    }
  });

  it("names an unknown factor as such", () => {
    expect(longAccelScaleProblem(5)?.problem).toMatch(/disagree by a factor of 5\.00: check the units of speed and long_accel/);
  });
});

describe("time, dampers and steering by their sizes", () => {
  it("a log's rate far outside 1 Hz – 5 kHz is a time unit slip (s against ms: a factor of 1000)", () => {
    expect(sampleRateProblem(100, 10_000)).toBeNull();
    expect(sampleRateProblem(0.1, 10_000)).toMatch(/logged in ms but mapped as s/);
    expect(sampleRateProblem(100_000, 10_000)).toMatch(/logged in s but mapped as ms/);
    expect(sampleRateProblem(0.1, 50)).toBeNull(); // too short a log to judge
  });

  it("damper travel over a stint: 10–80 mm is a damper; 25.4 times less or more is inches (NIST SP 811: 1 in = 25.4 mm)", () => {
    expect(damperRangeProblem("damper_fl", 20)).toBeNull();
    expect(damperRangeProblem("damper_fl", 20 / 25.4)).toMatch(/^damper_fl moves only 0\.79 mm .* inches or metres but mapped as mm/);
    expect(damperRangeProblem("damper_fl", 20 * 25.4)).toMatch(/^damper_fl moves 508 mm .* logged in mm but mapped as inches/);
  });

  it("steering against the corners' kinematic angle: 57.3 times off is deg against rad; other factors point at the steering ratio too", () => {
    // Steady-state steering (Gillespie ch. 6, from memory): δ_sw = N·(57.3·L/R + K·ay), one to a
    // few times the kinematic N·57.3·L/R; 1 rad = 57.2958°.
    for (const ratio of [1, 1.4, 3]) expect(steerScaleProblem(ratio)).toBeNull();
    expect(steerScaleProblem(1.4 * 57.2958)).toMatch(/about 80 times .* logged in deg but mapped as rad/);
    expect(steerScaleProblem(1.4 / 57.2958)).toMatch(/about 1\/41 of .* logged in rad but mapped as deg/);
    expect(steerScaleProblem(0.1)).toMatch(/check steer's unit \(deg or rad\) and the car's steering_ratio/);
  });
});

describe("lat_accel by the size of cornering", () => {
  it("flags a tenth of a real corner's ay, or ten times it, and leaves a straight-line test alone", () => {
    // Faster corners run at 0.7–3 g (common practice); g logged as m/s² reads 1/9.8 of that.
    expect(latAccelScaleProblem({ latG: 1.3, steerDeg: 40 })).toBeNull();
    expect(latAccelScaleProblem({ latG: 1.3 / 9.80665, steerDeg: 40 })).toMatch(/logged in g but mapped as m\/s²/);
    expect(latAccelScaleProblem({ latG: 1.3 * 9.80665, steerDeg: 40 })).toMatch(/logged in m\/s² but mapped as g/);
    // A straight-line aero run: little lateral acceleration and little steering is no unit slip.
    expect(latAccelScaleProblem({ latG: 0.05, steerDeg: 3 })).toBeNull();
    expect(latAccelScaleProblem({ latG: NaN, steerDeg: NaN })).toBeNull();
  });
});

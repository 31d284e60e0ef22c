import { describe, expect, it } from "vitest";
import { latAccelScaleProblem, longAccelScaleProblem } from "~/engine/unit-check";

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

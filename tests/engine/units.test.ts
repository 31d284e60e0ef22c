import { describe, expect, it } from "vitest";
import {
  CHANNEL_KIND,
  allowedUnits,
  canonicalUnit,
  kindsForUnit,
  unitFactor,
} from "~/engine/units";
import { ALL_CHANNELS } from "~/engine/types";

describe("unit factors to the engine's internal units", () => {
  it("mph to m/s is 0.44704", () => {
    // NIST SP 811 (2008), Appendix B.8: mile per hour (mi/h) → meter per second, 4.4704 E-01 (exact)
    expect(unitFactor("speed", "mph")).toBe(0.44704);
  });

  it("km/h to m/s is 1/3.6", () => {
    // NIST SP 811 (2008), Appendix B.8: kilometer per hour → meter per second, 2.777778 E-01 (= 1/3.6)
    expect(unitFactor("speed", "km/h")).toBe(1 / 3.6);
    expect(unitFactor("speed", "kph")).toBe(1 / 3.6);
    expect(unitFactor("speed", "km/h")).toBeCloseTo(0.2777778, 7);
    expect(unitFactor("speed", "m/s")).toBe(1);
  });

  it("one standard gravity is 9.80665 m/s²", () => {
    // NIST SP 811 (2008), Appendix B.8: standard acceleration of gravity (g_n) → m/s², 9.80665 E+00 (exact)
    expect(unitFactor("acceleration", "g")).toBe(9.80665);
    expect(unitFactor("acceleration", "m/s2")).toBe(1);
    expect(unitFactor("acceleration", "m/s²")).toBe(1);
    expect(unitFactor("acceleration", "m/s^2")).toBe(1);
  });

  it("inch to mm is 25.4 for dampers and ride height", () => {
    // NIST SP 811 (2008), Appendix B.8: inch → meter, 2.54 E-02 (exact), so 1 in = 25.4 mm
    expect(unitFactor("damper", "in")).toBeCloseTo(25.4, 12);
    expect(unitFactor("ride_height", "in")).toBeCloseTo(25.4, 12);
    // SI prefix milli = 10^-3 (NIST SP 811, Table 5)
    expect(unitFactor("damper", "m")).toBe(1000);
    expect(unitFactor("damper", "mm")).toBe(1);
  });

  it("milliseconds to seconds is 1e-3", () => {
    // SI prefix milli = 10^-3 (NIST SP 811 (2008), Table 5)
    expect(unitFactor("time", "ms")).toBe(0.001);
    expect(unitFactor("time", "s")).toBe(1);
  });

  it("radians to degrees is 180/π", () => {
    // NIST SP 811 (2008), Appendix B.9: degree (°) → radian, 1.745329 E-02 (= π/180)
    expect(1 / unitFactor("steer", "rad")!).toBeCloseTo(1.745329e-2, 8);
    expect(1 / unitFactor("yaw_rate", "rad/s")!).toBeCloseTo(1.745329e-2, 8);
    expect(unitFactor("steer", "deg")).toBe(1);
    expect(unitFactor("yaw_rate", "deg/s")).toBe(1);
  });
});

describe("unit spelling", () => {
  it("accepts spellings loggers commonly write (common practice)", () => {
    expect(canonicalUnit(" KM/H ")).toBe("km/h");
    expect(canonicalUnit("[mm]")).toBe("mm");
    expect(canonicalUnit("(deg)")).toBe("deg");
    expect(canonicalUnit("°")).toBe("deg");
    expect(canonicalUnit("sec")).toBe("s");
  });

  it("refuses a unit of the wrong kind and an unknown unit", () => {
    expect(unitFactor("speed", "mm")).toBeNull();
    expect(unitFactor("speed", "knots")).toBeNull();
    expect(kindsForUnit("mm")).toEqual(["damper", "ride_height"]);
  });

  it("lists the units the brief's contract requires for each kind", () => {
    // Rakeline's engine contract (issue 3): time s|ms; speed km/h|mph|m/s; acceleration g|m/s2; steer deg|rad; damper mm|in|m
    expect(allowedUnits("time")).toEqual(["s", "ms"]);
    expect(allowedUnits("speed")).toEqual(expect.arrayContaining(["km/h", "mph", "m/s"]));
    expect(allowedUnits("acceleration")).toEqual(["g", "m/s2"]);
    expect(allowedUnits("steer")).toEqual(["deg", "rad"]);
    expect(allowedUnits("damper")).toEqual(["mm", "in", "m"]);
    for (const ch of ALL_CHANNELS) expect(CHANNEL_KIND[ch]).toBeTypeOf("string");
  });
});

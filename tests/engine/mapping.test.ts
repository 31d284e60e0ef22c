import { describe, expect, it } from "vitest";
import { inspectLog, suggestChannelMap, validateChannelMap } from "~/engine/ingest";
import { EngineError } from "~/engine/errors";
import { REQUIRED_CHANNELS } from "~/engine/types";
import type { LogHeader } from "~/engine/types";

// The header styles below are invented for these tests; what they test is trade vocabulary
// (common practice): corner codes FL/FR/RL/RR (also LF/RF/LR), an axle word with a side, lateral and
// longitudinal acceleration (also across/along, side/forward), steering or handwheel angle, damper
// travel (stroke, strut), ride height (ground clearance), yaw rate (turn or heading rate).
const enc = (s: string) => new TextEncoder().encode(s);
function headerOf(names: string[], units?: string[]): LogHeader {
  const lines = [names.map((n) => (n.includes(",") ? `"${n}"` : n)).join(",")];
  if (units) lines.push(units.join(","));
  for (let i = 0; i < 30; i++) lines.push(names.map((_, j) => String(i + j / 10)).join(","));
  return inspectLog(enc(lines.join("\n") + "\n"));
}

function engineError(fn: () => unknown): EngineError {
  try {
    fn();
  } catch (e) {
    if (e instanceof EngineError) return e;
    throw e;
  }
  throw new Error("expected an EngineError");
}

describe("suggestChannelMap on realistic headers", () => {
  it("names with units in brackets, beside GPS and engine channels that must not be taken", () => {
    const h = headerOf(["Elapsed [s]", "Vehicle Speed [km/h]", "GPS Speed [km/h]", "Engine Speed [rpm]", "Sideways Accel [g]", "Fore-Aft Accel [g]",
      "Hand Wheel [deg]", "Damper Travel FL [mm]", "Damper Travel FR [mm]", "Damper Travel RL [mm]", "Damper Travel RR [mm]", "GPS Lat [deg]", "GPS Long [deg]"]);
    const { map, notes } = suggestChannelMap(h);
    expect(map).toEqual({
      time: { column: "Elapsed [s]", unit: "s" },
      speed: { column: "Vehicle Speed [km/h]", unit: "km/h" },
      lat_accel: { column: "Sideways Accel [g]", unit: "g" },
      long_accel: { column: "Fore-Aft Accel [g]", unit: "g" },
      steer: { column: "Hand Wheel [deg]", unit: "deg" },
      damper_fl: { column: "Damper Travel FL [mm]", unit: "mm" },
      damper_fr: { column: "Damper Travel FR [mm]", unit: "mm" },
      damper_rl: { column: "Damper Travel RL [mm]", unit: "mm" },
      damper_rr: { column: "Damper Travel RR [mm]", unit: "mm" },
    });
    expect(notes.join(" ")).not.toMatch(/no column found/);
  });

  it("run-together camelCase names and a short speed symbol", () => {
    const h = headerOf(["ElapsedSec", "vCar", "SideG", "FwdG", "HandWheel", "StrokeFL", "StrokeFR", "StrokeRL", "StrokeRR"],
      ["s", "mph", "g", "g", "deg", "mm", "mm", "mm", "mm"]);
    const { map, notes } = suggestChannelMap(h);
    expect(map.time).toEqual({ column: "ElapsedSec", unit: "s" });
    expect(map.speed).toEqual({ column: "vCar", unit: "mph" });
    expect(map.lat_accel).toEqual({ column: "SideG", unit: "g" });
    expect(map.long_accel).toEqual({ column: "FwdG", unit: "g" });
    expect(map.steer!.column).toBe("HandWheel");
    expect([map.damper_fl!.column, map.damper_fr!.column, map.damper_rl!.column, map.damper_rr!.column]).toEqual(["StrokeFL", "StrokeFR", "StrokeRL", "StrokeRR"]);
    expect(notes.join(" ")).not.toMatch(/no column found/);
  });

  it("snake_case names with a units row, LF/RF corner codes, mph and inches", () => {
    const h = headerOf(
      ["time_from_start", "car_spd", "transverse_accel", "along_accel", "steering_angle", "strut_travel_lf", "strut_travel_rf", "strut_travel_lr", "strut_travel_rr", "ground_clearance_front", "ground_clearance_rear", "heading_rate"],
      ["ms", "mph", "m/s^2", "m/s^2", "rad", "in", "in", "in", "in", "mm", "mm", "rad/s"],
    );
    const { map } = suggestChannelMap(h);
    expect(map.time).toEqual({ column: "time_from_start", unit: "ms" });
    expect(map.speed).toEqual({ column: "car_spd", unit: "mph" });
    expect(map.lat_accel).toEqual({ column: "transverse_accel", unit: "m/s2" });
    expect(map.long_accel).toEqual({ column: "along_accel", unit: "m/s2" });
    expect(map.steer).toEqual({ column: "steering_angle", unit: "rad" });
    expect(map.damper_fl!.column).toBe("strut_travel_lf");
    expect(map.damper_fr!.column).toBe("strut_travel_rf");
    expect(map.damper_rl!.column).toBe("strut_travel_lr");
    expect(map.damper_rr).toEqual({ column: "strut_travel_rr", unit: "in" });
    expect(map.ride_height_front!.column).toBe("ground_clearance_front");
    expect(map.ride_height_rear!.column).toBe("ground_clearance_rear");
    expect(map.yaw_rate).toEqual({ column: "heading_rate", unit: "rad/s" });
  });

  it("spelled-out corners, an axle word with a side letter, no units: proposes defaults and says to confirm them", () => {
    const h = headerOf(["Run Time", "Lap Time", "Road Speed", "Lateral Acceleration", "Longitudinal Acceleration", "Steer",
      "Left Front Travel", "Front R Travel", "Rear L Travel", "Right Rear Travel", "Travel Velocity FL"]);
    const { map, notes } = suggestChannelMap(h);
    expect(map.time!.column).toBe("Run Time");
    expect(map.speed!.column).toBe("Road Speed");
    expect(map.damper_fl!.column).toBe("Left Front Travel");
    expect(map.damper_fr!.column).toBe("Front R Travel");
    expect(map.damper_rl!.column).toBe("Rear L Travel");
    expect(map.damper_rr!.column).toBe("Right Rear Travel");
    expect(map.speed!.unit).toBe("km/h");
    expect(notes).toContain('speed: "Road Speed" has no unit in the file; km/h assumed — confirm');
  });

  it("words that only look like a channel are not taken: steering rate, wheel speed against road speed, side slip", () => {
    const h = headerOf(["Time", "Road Speed", "Wheel Speed FL", "Steer Rate", "Handwheel Angle", "Side Slip", "Cross Accel", "Inline Accel"],
      ["s", "km/h", "km/h", "deg/s", "deg", "deg", "g", "g"]);
    const { map } = suggestChannelMap(h);
    expect(map.speed!.column).toBe("Road Speed");
    expect(map.steer!.column).toBe("Handwheel Angle");
    expect(map.lat_accel!.column).toBe("Cross Accel");
    expect(map.long_accel!.column).toBe("Inline Accel");
    expect(Object.values(map).map((e) => e.column)).not.toContain("Side Slip");
    expect(map.yaw_rate).toBeUndefined();
  });

  it("lists the required channels it could not find and flags a unit it cannot read", () => {
    const h = headerOf(["Time", "Speed", "Water Temp"], ["s", "knots", "degC"]);
    const { map, notes } = suggestChannelMap(h);
    expect(map.speed).toEqual({ column: "Speed", unit: "km/h" });
    expect(notes.join("\n")).toMatch(/speed: "Speed" is in "knots", which Rakeline cannot read for speed; choose one of km\/h, kph, mph, m\/s/);
    expect(notes.join("\n")).toMatch(/no column found for lat_accel, long_accel, steer, damper_fl, damper_fr, damper_rl, damper_rr/);
  });
});

describe("validateChannelMap", () => {
  const h = headerOf(["Time", "Speed", "Across", "Along", "Steer", "FL", "FR", "RL", "RR"]);
  const good = {
    time: { column: "Time", unit: "s" }, speed: { column: "Speed", unit: "KM/H" }, lat_accel: { column: "Across", unit: "g" },
    long_accel: { column: "Along", unit: "m/s²" }, steer: { column: "Steer", unit: "deg", invert: true }, damper_fl: { column: "FL", unit: "mm" },
    damper_fr: { column: "FR", unit: "mm" }, damper_rl: { column: "RL", unit: "mm" }, damper_rr: { column: "RR", unit: "mm" },
  };

  it("accepts a good map and normalises unit spellings", () => {
    const m = validateChannelMap(good, h);
    expect(m.speed.unit).toBe("km/h");
    expect(m.long_accel.unit).toBe("m/s2");
    expect(m.steer.invert).toBe(true);
    expect(Object.keys(m)).toEqual([...REQUIRED_CHANNELS]);
  });

  it("unknown unit: lists the allowed ones for that channel", () => {
    const e = engineError(() => validateChannelMap({ ...good, speed: { column: "Speed", unit: "knots" } }, h));
    expect(e.code).toBe("unknown_unit");
    expect(e.message).toBe('unit "knots" for speed is not one Rakeline reads; use one of km/h, kph, mph, m/s');
  });

  it("mapped column absent: lists the columns that exist", () => {
    const e = engineError(() => validateChannelMap({ ...good, damper_rr: { column: "Travel RR", unit: "mm" } }, h));
    expect(e.code).toBe("column_missing");
    expect(e.message).toBe('column "Travel RR" mapped to damper_rr is not in the file; its columns are "Time", "Speed", "Across", "Along", "Steer", "FL", "FR", "RL", "RR"');
  });

  it("bad shapes: not an object, missing channels, unknown channels, wrong field types, a column used twice", () => {
    const cases: [unknown, RegExp][] = [
      [[1, 2], /must be an object/],
      [{ time: good.time }, /no entry for speed, lat_accel, long_accel, steer, damper_fl, damper_fr, damper_rl, damper_rr/],
      [{ ...good, tyre_temp: { column: "FL", unit: "mm" } }, /unknown channels: tyre_temp/],
      [{ ...good, speed: { column: "Speed", unit: "km/h", invert: "yes" } }, /entry speed\.invert/],
      [{ ...good, time: { column: "", unit: "s" } }, /entry time\.column: column must name a column/],
      [{ ...good, damper_fr: { column: "FL", unit: "mm" } }, /"FL" is mapped to both damper_fl and damper_fr/],
    ];
    for (const [map, re] of cases) {
      const e = engineError(() => validateChannelMap(map, h));
      expect(e.code).toBe("bad_map");
      expect(e.message).toMatch(re);
    }
  });

  it("a text column mapped to a channel", () => {
    const text = headerOf(["Time", "Speed", "Across", "Along", "Steer", "FL", "FR", "RL", "RR"]);
    const withNote = { ...text, skippedColumns: ["Steer"], numericColumns: text.numericColumns.filter((c) => c !== "Steer") };
    const e = engineError(() => validateChannelMap(good, withNote));
    expect(e.code).toBe("column_not_numeric");
    expect(e.message).toMatch(/column "Steer" mapped to steer holds text, not numbers/);
  });
});

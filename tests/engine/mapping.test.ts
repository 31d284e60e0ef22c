import { describe, expect, it } from "vitest";
import { inspectLog, suggestChannelMap, validateChannelMap } from "~/engine/ingest";
import { EngineError } from "~/engine/errors";
import { REQUIRED_CHANNELS } from "~/engine/types";
import type { LogHeader } from "~/engine/types";

// The header styles below are invented for these tests; what they test is trade vocabulary
// (common practice): corner codes FL/FR/RL/RR (also LF/RF/LR), "lateral"/"longitudinal" g,
// steering wheel angle, damper (shock) position, ride height, yaw rate.
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
  it("names with units in brackets", () => {
    const h = headerOf(["Time [s]", "Speed [km/h]", "GPS Speed [km/h]", "Engine Speed [rpm]", "Lat G [g]", "Long G [g]", "Steering Angle [deg]",
      "Damper FL [mm]", "Damper FR [mm]", "Damper RL [mm]", "Damper RR [mm]", "GPS Lat [deg]", "GPS Long [deg]"]);
    const { map, notes } = suggestChannelMap(h);
    expect(map).toEqual({
      time: { column: "Time [s]", unit: "s" },
      speed: { column: "Speed [km/h]", unit: "km/h" },
      lat_accel: { column: "Lat G [g]", unit: "g" },
      long_accel: { column: "Long G [g]", unit: "g" },
      steer: { column: "Steering Angle [deg]", unit: "deg" },
      damper_fl: { column: "Damper FL [mm]", unit: "mm" },
      damper_fr: { column: "Damper FR [mm]", unit: "mm" },
      damper_rl: { column: "Damper RL [mm]", unit: "mm" },
      damper_rr: { column: "Damper RR [mm]", unit: "mm" },
    });
    expect(notes.join(" ")).not.toMatch(/no column found/);
  });

  it("run-together camelCase names and short speed symbols", () => {
    // Compact names as small loggers write them (invented for this test; vocabulary is common practice).
    const h = headerOf(["TimeS", "v_ground", "LatG", "LongG", "SteerWheel", "DampFL", "DampFR", "DampRL", "DampRR"],
      ["s", "mph", "g", "g", "deg", "mm", "mm", "mm", "mm"]);
    const { map, notes } = suggestChannelMap(h);
    expect(map.speed).toEqual({ column: "v_ground", unit: "mph" });
    expect(map.lat_accel).toEqual({ column: "LatG", unit: "g" });
    expect(map.long_accel).toEqual({ column: "LongG", unit: "g" });
    expect(map.steer!.column).toBe("SteerWheel");
    expect([map.damper_fl!.column, map.damper_fr!.column, map.damper_rl!.column, map.damper_rr!.column]).toEqual(["DampFL", "DampFR", "DampRL", "DampRR"]);
    expect(notes.join(" ")).not.toMatch(/no column found/);
  });

  it("snake_case names with a units row, LF/RF corner codes, mph and inches", () => {
    const h = headerOf(
      ["elapsed_time", "vehicle_speed", "accel_lateral", "accel_longitudinal", "steering_wheel_angle", "shock_pos_lf", "shock_pos_rf", "shock_pos_lr", "shock_pos_rr", "ride_height_front", "ride_height_rear", "yaw_rate"],
      ["ms", "mph", "m/s^2", "m/s^2", "rad", "in", "in", "in", "in", "mm", "mm", "rad/s"],
    );
    const { map } = suggestChannelMap(h);
    expect(map.time).toEqual({ column: "elapsed_time", unit: "ms" });
    expect(map.speed).toEqual({ column: "vehicle_speed", unit: "mph" });
    expect(map.lat_accel).toEqual({ column: "accel_lateral", unit: "m/s2" });
    expect(map.long_accel).toEqual({ column: "accel_longitudinal", unit: "m/s2" });
    expect(map.steer).toEqual({ column: "steering_wheel_angle", unit: "rad" });
    expect(map.damper_fl!.column).toBe("shock_pos_lf");
    expect(map.damper_fr!.column).toBe("shock_pos_rf");
    expect(map.damper_rl!.column).toBe("shock_pos_lr");
    expect(map.damper_rr).toEqual({ column: "shock_pos_rr", unit: "in" });
    expect(map.ride_height_front!.column).toBe("ride_height_front");
    expect(map.ride_height_rear!.column).toBe("ride_height_rear");
    expect(map.yaw_rate).toEqual({ column: "yaw_rate", unit: "rad/s" });
  });

  it("spelled-out corners, no units: proposes defaults and says to confirm them", () => {
    const h = headerOf(["Session Time", "Lap Time", "Ground Speed", "Lateral Acceleration", "Longitudinal Acceleration", "Steer",
      "Front Left Damper", "Front Right Damper", "Rear Left Damper", "Rear Right Damper", "Damper Velocity FL"]);
    const { map, notes } = suggestChannelMap(h);
    expect(map.time!.column).toBe("Session Time");
    expect(map.speed!.column).toBe("Ground Speed");
    expect(map.damper_fl!.column).toBe("Front Left Damper");
    expect(map.damper_rr!.column).toBe("Rear Right Damper");
    expect(map.speed!.unit).toBe("km/h");
    expect(notes).toContain('speed: "Ground Speed" has no unit in the file; km/h assumed — confirm');
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
  const h = headerOf(["Time", "Speed", "LatG", "LongG", "Steer", "FL", "FR", "RL", "RR"]);
  const good = {
    time: { column: "Time", unit: "s" }, speed: { column: "Speed", unit: "KM/H" }, lat_accel: { column: "LatG", unit: "g" },
    long_accel: { column: "LongG", unit: "m/s²" }, steer: { column: "Steer", unit: "deg", invert: true }, damper_fl: { column: "FL", unit: "mm" },
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
    const e = engineError(() => validateChannelMap({ ...good, damper_rr: { column: "Damper RR", unit: "mm" } }, h));
    expect(e.code).toBe("column_missing");
    expect(e.message).toBe('column "Damper RR" mapped to damper_rr is not in the file; its columns are "Time", "Speed", "LatG", "LongG", "Steer", "FL", "FR", "RL", "RR"');
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
    const text = headerOf(["Time", "Speed", "LatG", "LongG", "Steer", "FL", "FR", "RL", "RR"]);
    const withNote = { ...text, skippedColumns: ["Steer"], numericColumns: text.numericColumns.filter((c) => c !== "Steer") };
    const e = engineError(() => validateChannelMap(good, withNote));
    expect(e.code).toBe("column_not_numeric");
    expect(e.message).toMatch(/column "Steer" mapped to steer holds text, not numbers/);
  });
});

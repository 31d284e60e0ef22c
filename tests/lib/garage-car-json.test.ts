import { describe, expect, it } from "vitest";
import { readdirSync, readFileSync } from "node:fs";
import { validateCar } from "~/engine/car";
import { carInputToText, fromCarInput, parseCarInputText, toCarInput } from "~/lib/garage/car-json";
import { fieldErrors, setupFormSchema } from "~/lib/garage/schemas";

// The CAR.json contract (issue #3, app/engine/types.ts CarInput): exactly these keys, in this order.
const CAR_FILE = `{
  "name": "Round-trip car",
  "wheelbase_mm": 2450,
  "mass_kg": 621.5,
  "static_front_weight_pct": 41.3,
  "cog_height_mm": 420,
  "steering_ratio": 11.5,
  "front": {
    "spring_rate_n_per_mm": 95.3,
    "motion_ratio": 0.92,
    "bump_stop": {
      "gap_mm": 18,
      "rate_n_per_mm": 450
    }
  },
  "rear": {
    "spring_rate_n_per_mm": 122.6,
    "motion_ratio": 0.78
  },
  "static_damper_mm": {
    "fl": 41.2,
    "fr": 40.8,
    "rl": 52.1,
    "rr": 51.7
  }
}
`;

function roundTrip(text: string): string {
  const parsed = parseCarInputText(text);
  if (!parsed.ok) throw new Error(parsed.errors.join("\n"));
  const { car, setup } = fromCarInput(parsed.car);
  return carInputToText(toCarInput(car, setup));
}

describe("CAR.json import → export", () => {
  it("returns the same file, byte for byte (JSON.stringify key order follows insertion, ECMA-262 §25.5.2)", () => {
    expect(roundTrip(CAR_FILE)).toBe(CAR_FILE);
    expect(JSON.parse(roundTrip(CAR_FILE))).toEqual(JSON.parse(CAR_FILE));
  });

  it("a file without optional parts stays without them", () => {
    const minimal = JSON.parse(CAR_FILE);
    delete minimal.static_damper_mm;
    delete minimal.front.bump_stop;
    expect(JSON.parse(roundTrip(JSON.stringify(minimal)))).toEqual(minimal);
  });

  // The demo generator's car files (sample-data/cars) are the CLI's own inputs: each must survive.
  const samples = readdirSync("sample-data/cars").filter((f) => f.endsWith(".json"));
  it("finds the demo generator's car files", () => {
    expect(samples.length).toBeGreaterThan(0);
  });
  it.each(samples)("the demo car file %s round-trips and stays valid for the engine", (file) => {
    const text = readFileSync(`sample-data/cars/${file}`, "utf8");
    const out = roundTrip(text);
    expect(JSON.parse(out)).toEqual(JSON.parse(text));
    expect(() => validateCar(JSON.parse(out))).not.toThrow();
  });

  it("a bump-stop table travels as the table, with its least-squares rate beside it", () => {
    // Seeded-style progressive packer (rows from contact, at the damper). Rate through zero,
    // k = Σ(F·x) / Σx² (least squares through the origin): (5·900 + 10·2200 + 15·4000) / (25 + 100 + 225).
    const withTable = JSON.parse(CAR_FILE);
    const table = [{ deflection_mm: 5, force_n: 900 }, { deflection_mm: 10, force_n: 2200 }, { deflection_mm: 15, force_n: 4000 }];
    withTable.rear.bump_stop = { gap_mm: 25, rate_n_per_mm: (5 * 900 + 10 * 2200 + 15 * 4000) / 350, force_table: table };
    const text = carInputToText(withTable);
    const parsed = parseCarInputText(text);
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    const { setup } = fromCarInput(parsed.car);
    expect(setup.rearBumpStopKind).toBe("table");
    expect(setup.rearBumpStopTable).toEqual([{ deflectionMm: 5, forceN: 900 }, { deflectionMm: 10, forceN: 2200 }, { deflectionMm: 15, forceN: 4000 }]);
    expect(roundTrip(text)).toBe(text);
    expect(validateCar(JSON.parse(text)).rear.bump_stop!.force_table).toEqual(table);
  });

  it("the exported file passes the engine's own car validation (app/engine/car.ts)", () => {
    expect(validateCar(JSON.parse(roundTrip(CAR_FILE)))).toEqual(JSON.parse(CAR_FILE));
  });
});

describe("CAR.json import errors", () => {
  it("names an unknown key", () => {
    const bad = { ...JSON.parse(CAR_FILE), colour: "blue" };
    const r = parseCarInputText(JSON.stringify(bad));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors).toEqual(['unknown key "colour" (a car file holds only the CAR.json keys).']);
  });

  it("names a missing key and a wrong type with their paths", () => {
    const bad = JSON.parse(CAR_FILE);
    delete bad.cog_height_mm;
    bad.rear.motion_ratio = "0.78";
    const r = parseCarInputText(JSON.stringify(bad));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.errors).toContain("cog_height_mm is missing (a number from 100 to 1200 mm).");
      expect(r.errors.join("\n")).toMatch(/^rear\.motion_ratio must be a number from 0\.3 to 1\.5 .*got "0\.78"\.$/m);
    }
  });

  it("applies the engine's plausibility ranges (a motion ratio of 7 is a typing error)", () => {
    const bad = JSON.parse(CAR_FILE);
    bad.front.motion_ratio = 7;
    const r = parseCarInputText(JSON.stringify(bad));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors[0]).toMatch(/^front\.motion_ratio must be a number from 0\.3 to 1\.5 .*got 7\.$/);
  });

  it("takes exactly the files the CLI takes: one schema (app/engine/car.ts) for both", () => {
    // Values at the edges of the engine's ranges, which the Garage form's own ranges used to refuse.
    const edge = { ...JSON.parse(CAR_FILE), wheelbase_mm: 1300, mass_kg: 3000, steering_ratio: 35, fuel_tank_from_front_axle_mm: 1400 };
    expect(() => validateCar(edge)).not.toThrow();
    expect(parseCarInputText(JSON.stringify(edge)).ok).toBe(true);
    // And refuse the same: the CLI names the first problem, the Garage lists them all.
    for (const bad of [{ ...edge, wheelbase_mm: 1100 }, { ...edge, colour: "blue" }, { ...edge, fuel_tank_from_front_axle_mm: "1400" }]) {
      expect(() => validateCar(bad)).toThrow();
      const r = parseCarInputText(JSON.stringify(bad));
      expect(r.ok).toBe(false);
      if (!r.ok) expect(() => validateCar(bad)).toThrow(r.errors[0].replace(/\.$/, ""));
    }
  });

  it("carries the fuel tank position through import and export", () => {
    const withTank = { ...JSON.parse(CAR_FILE), fuel_tank_from_front_axle_mm: 1400 };
    const text = JSON.stringify(withTank);
    const out = JSON.parse(roundTrip(text));
    expect(out.fuel_tank_from_front_axle_mm).toBe(1400);
    expect(Object.keys(out).indexOf("fuel_tank_from_front_axle_mm")).toBe(Object.keys(out).indexOf("steering_ratio") + 1);
  });

  it("names what is wrong with a bump-stop table", () => {
    const bad = JSON.parse(CAR_FILE);
    bad.front.bump_stop.force_table = [{ deflection_mm: 0, force_n: 0 }, { deflection_mm: 4, force_n: 800 }, { deflection_mm: 3, force_n: 900 }];
    const r = parseCarInputText(JSON.stringify(bad));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors).toEqual(["front.bump_stop.force_table.2.deflection_mm must be larger than the row before (4 mm)."]);
    bad.front.bump_stop.force_table = [{ deflection_mm: 0, force: 0 }];
    const r2 = parseCarInputText(JSON.stringify(bad));
    expect(r2.ok).toBe(false);
    if (!r2.ok) expect(r2.errors.join(" ")).toMatch(/force_table.0.force_n is missing/);
  });

  it("says when the text is not JSON", () => {
    const r = parseCarInputText("name: Marlin");
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors[0]).toMatch(/^The file is not valid JSON/);
  });
});

describe("bump-stop tables the form keeps are tables the car file takes (issue 12 item 4)", () => {
  const form = (table: string) => ({
    units: "metric", name: "Bounds", frontSpringRateNPerMm: "100", rearSpringRateNPerMm: "120", frontMotionRatio: "0.9",
    rearMotionRatio: "0.8", frontBumpStopKind: "none", rearBumpStopKind: "table", rearBumpStopGapMm: "20", rearBumpStopTable: table,
  });
  it.each([
    ["1 1e300\n2 2e300", /force .* is above 200000 N/],
    ["1e300 100\n2e300 200", /deflection .* past the 150 mm/],
    ["1e200 1e200\n2e200 2e200", /deflection .* past the 150 mm/],
  ])("refuses %j with a message that says which row", (table, message) => {
    const parsed = setupFormSchema("metric").safeParse(form(table));
    expect(parsed.success).toBe(false);
    if (parsed.success) return;
    expect(fieldErrors(parsed.error).rearBumpStopTable).toMatch(message);
  });
  it("a table at the bounds exports to a file the engine's schema (the CLI's) reads back unchanged", () => {
    // 150 mm and 200 000 N are the engine's own CAR_LIMITS for a table row (app/engine/car.ts).
    const parsed = setupFormSchema("metric").safeParse(form("10 1000\n150 200000"));
    expect(parsed.success).toBe(true);
    if (!parsed.success) return;
    const text = carInputToText(toCarInput(
      { name: "Bounds", wheelbaseMm: 2450, massKg: 620, staticFrontWeightPct: 44, cogHeightMm: 400, steeringRatio: 12 },
      { ...parsed.data, rearBumpStopRateNPerMm: null, frontBumpStopGapMm: null, frontBumpStopRateNPerMm: null, frontBumpStopTable: null } as never,
    ));
    expect(() => validateCar(JSON.parse(text))).not.toThrow();
    const back = parseCarInputText(text);
    expect(back.ok).toBe(true);
    if (back.ok) expect(fromCarInput(back.car).setup.rearBumpStopTable).toEqual([{ deflectionMm: 10, forceN: 1000 }, { deflectionMm: 150, forceN: 200000 }]);
  });
  it("a garage block with an unknown key or a value outside the form's range is refused, naming the key", () => {
    const file = { ...JSON.parse(CAR_FILE), garage: { track_front_mm: 99999, paint: "blue", weighed_with_driver: "yes" } };
    const r = parseCarInputText(JSON.stringify(file));
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors.some((e) => e.includes('"paint"'))).toBe(true);
    expect(r.errors.some((e) => e.startsWith("garage.track_front_mm"))).toBe(true);
    expect(r.errors.some((e) => e.startsWith("garage.weighed_with_driver must be true or false"))).toBe(true);
  });
  it("corner weights that disagree with mass_kg are refused", () => {
    // 150 × 4 = 600 kg against a stated 621.5 kg: more than max(2 kg, 0.5 %) apart (the Garage form's tolerance).
    const file = { ...JSON.parse(CAR_FILE), garage: { corner_fl_kg: 150, corner_fr_kg: 150, corner_rl_kg: 150, corner_rr_kg: 150 } };
    const r = parseCarInputText(JSON.stringify(file));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors.join(" ")).toMatch(/add up to 600 kg but mass_kg is 621.5/);
  });
});

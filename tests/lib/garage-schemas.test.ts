import { describe, expect, it } from "vitest";
import { carFormSchema, fieldErrors, setupFormSchema } from "~/lib/garage/schemas";
import { linearRateFromTable, parseBumpStopTable } from "~/lib/garage/bump-stop";
import { applyExactNumbers } from "~/lib/garage/form-data";
import { CAR_FIELDS } from "~/lib/garage/fields";

const car = {
  name: "Test car",
  wheelbaseMm: "2450",
  cogHeightMm: "420",
  steeringRatio: "12",
  fuelDensityKgPerL: "0.745",
  cornerFlKg: "150",
  cornerFrKg: "155",
  cornerRlKg: "160",
  cornerRrKg: "155",
};

const setup = {
  name: "Baseline",
  frontSpringRateNPerMm: "90",
  rearSpringRateNPerMm: "110",
  frontMotionRatio: "0.9",
  rearMotionRatio: "0.8",
};

function errorsOf(result: ReturnType<ReturnType<typeof carFormSchema>["safeParse"]> | ReturnType<ReturnType<typeof setupFormSchema>["safeParse"]>) {
  expect(result.success).toBe(false);
  return result.success ? {} : fieldErrors(result.error);
}

describe("car form validation", () => {
  it("a wheelbase of 59 in (1498.6 mm) is below the plausible 1500–3500 mm and is reported in both units", () => {
    // 59 in × 25.4 mm/in = 1498.6 mm (NIST SP 811: 1 in = 25.4 mm exactly)
    const errors = errorsOf(carFormSchema("imperial").safeParse({ ...car, wheelbaseMm: "59", cornerFlKg: "", cornerFrKg: "", cornerRlKg: "", cornerRrKg: "", massKg: "1400", staticFrontWeightPct: "50" }));
    expect(errors.wheelbaseMm).toContain("59 in (1499 mm)");
    expect(errors.wheelbaseMm).toContain("1500–3500 mm");
  });

  it("corner weights that disagree with the stated total are refused, naming both numbers", () => {
    // 150 + 155 + 160 + 155 = 620 kg, stated 650 kg: 30 kg apart, beyond max(2 kg, 0.5 % of 650 = 3.25 kg)
    const errors = errorsOf(carFormSchema("metric").safeParse({ ...car, massKg: "650" }));
    expect(errors.massKg).toMatch(/add up to 620 kg.*stated total mass is 650 kg/);
  });

  it("a stated total within scale rounding is accepted (620 kg vs 621 kg, 1 kg apart)", () => {
    const result = carFormSchema("metric").safeParse({ ...car, massKg: "621" });
    expect(result.success).toBe(true);
  });

  it("three corner weights out of four are refused on the missing one", () => {
    const errors = errorsOf(carFormSchema("metric").safeParse({ ...car, cornerRrKg: "" }));
    expect(Object.keys(errors)).toEqual(["cornerRrKg"]);
  });

  it("without corner weights the total mass and front % are required", () => {
    const errors = errorsOf(carFormSchema("metric").safeParse({ ...car, cornerFlKg: "", cornerFrKg: "", cornerRlKg: "", cornerRrKg: "" }));
    expect(errors.massKg).toMatch(/required/);
    expect(errors.staticFrontWeightPct).toMatch(/required/);
  });

  it("text in a number field says which field and what was typed", () => {
    const errors = errorsOf(carFormSchema("metric").safeParse({ ...car, cogHeightMm: "about 400" }));
    expect(errors.cogHeightMm).toBe('CoG height: "about 400" is not a number.');
  });

  it("imperial corner weights are stored in kg (NIST SP 811: 1 lb = 0.45359237 kg)", () => {
    // 330 lb × 0.45359237 = 149.6854821 kg
    const result = carFormSchema("imperial").safeParse({ ...car, wheelbaseMm: "96.4567", cogHeightMm: "16.5", cornerFlKg: "330", cornerFrKg: "340", cornerRlKg: "350", cornerRrKg: "340" });
    expect(result.success).toBe(true);
    if (result.success) expect(result.data.cornerFlKg).toBeCloseTo(149.6854821, 7);
  });
});

describe("setup form validation", () => {
  it("a motion ratio of 7 is called a typing error with the convention spelt out", () => {
    // MR = damper travel / wheel travel; values above 1.5 are not found on circuit cars (common practice)
    const errors = errorsOf(setupFormSchema("metric").safeParse({ ...setup, frontMotionRatio: "7" }));
    expect(errors.frontMotionRatio).toMatch(/motion ratio of 7 looks like a typing error/);
    expect(errors.frontMotionRatio).toMatch(/damper travel \/ wheel travel/);
  });

  it("a motion ratio of 1.6 suggests its inverse 0.625 (wheel/damper measured the other way round)", () => {
    // 1 / 1.6 = 0.625
    const errors = errorsOf(setupFormSchema("metric").safeParse({ ...setup, rearMotionRatio: "1.6" }));
    expect(errors.rearMotionRatio).toContain("1/1.6 = 0.625");
  });

  it("a negative bump-stop gap is refused with what the gap means", () => {
    const errors = errorsOf(setupFormSchema("metric").safeParse({ ...setup, frontBumpStopKind: "linear", frontBumpStopGapMm: "-5", frontBumpStopRateNPerMm: "300" }));
    expect(errors.frontBumpStopGapMm).toMatch(/negative.*from static to contact/);
  });

  it("a linear bump stop needs its rate; partial static damper readings are refused", () => {
    const errors = errorsOf(
      setupFormSchema("metric").safeParse({ ...setup, rearBumpStopKind: "linear", rearBumpStopGapMm: "20", staticDamperFlMm: "40" }),
    );
    expect(errors.rearBumpStopRateNPerMm).toMatch(/rate at the damper/);
    expect(errors.staticDamperFrMm).toMatch(/all four/);
  });

  it("imperial spring rates are stored in N/mm (NIST SP 811: lbf/in → N/m 175.1268)", () => {
    // 600 lbf/in × 0.17512683524648 = 105.0761 N/mm
    const result = setupFormSchema("imperial").safeParse({ ...setup, frontSpringRateNPerMm: "600" });
    expect(result.success).toBe(true);
    if (result.success) expect(result.data.frontSpringRateNPerMm).toBeCloseTo(105.0761, 4);
  });
});

describe("bump-stop tables", () => {
  it("least-squares rate through the origin k = Σxy / Σx² (NIST StRD NoInt1 model class; hand-computed)", () => {
    // points (5, 1000), (10, 2100): Σxy = 5000 + 21000 = 26000, Σx² = 25 + 100 = 125 → k = 208 N/mm
    const points = parseBumpStopTable("5 1000\n10, 2100", "metric");
    expect(typeof points).not.toBe("string");
    if (typeof points !== "string") expect(linearRateFromTable(points)).toBeCloseTo(208, 10);
  });

  it("a falling force is refused with the row number", () => {
    const errors = errorsOf(setupFormSchema("metric").safeParse({ ...setup, frontBumpStopKind: "table", frontBumpStopGapMm: "10", frontBumpStopTable: "2 100\n4 80" }));
    expect(errors.frontBumpStopTable).toMatch(/row 2: force must not fall/);
  });
});

describe("exact values behind converted inputs", () => {
  // 1367 lb × 0.45359237 = 620.06 kg (NIST SP 811), no corner weights
  const imperialCar = { name: "Imperial", steeringRatio: "12", fuelDensityKgPerL: "0.745", massKg: "1367", staticFrontWeightPct: "44" };
  it("a value typed in mm, shown in inches and posted back unchanged is stored as typed", () => {
    // 2450 mm / 25.4 = 96.4567 in at 6 significant digits; 96.4567 × 25.4 = 2450.00018 mm would be stored otherwise
    const fields = { ...imperialCar, wheelbaseMm: "96.4567", "exact.wheelbaseMm": "2450", cogHeightMm: "16.5354", "exact.cogHeightMm": "420" };
    const exact = carFormSchema("imperial").safeParse(applyExactNumbers(fields, CAR_FIELDS, "imperial"));
    expect(exact.success && exact.data.wheelbaseMm).toBe(2450);
    expect(exact.success && exact.data.cogHeightMm).toBe(420);
  });

  it("once the person edits the text, the typed value counts (97 in × 25.4 = 2463.8 mm)", () => {
    const fields = { ...imperialCar, wheelbaseMm: "97", "exact.wheelbaseMm": "2450", cogHeightMm: "16.5" };
    const edited = carFormSchema("imperial").safeParse(applyExactNumbers(fields, CAR_FIELDS, "imperial"));
    expect(edited.success && edited.data.wheelbaseMm).toBeCloseTo(2463.8, 10);
  });
});

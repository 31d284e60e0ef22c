import { describe, expect, it } from "vitest";
import {
  KG_PER_LB,
  L_PER_US_GAL,
  MM_PER_IN,
  N_PER_LBF,
  N_PER_MM_PER_LBF_PER_IN,
  formatForInput,
  fromStored,
  keepIfUnchanged,
  parseTypedNumber,
  NOT_A_NUMBER,
  StoredValue,
  toStored,
} from "~/lib/garage/units";

// Reference factors: NIST Special Publication 811 (2008 edition), Appendix B.8/B.9
// ("Factors for units listed alphabetically / by kind of quantity").
describe("NIST SP 811 conversion factors", () => {
  it("inch → millimetre is exactly 25.4 (SP 811: in → m 2.54 E-02, exact)", () => {
    expect(MM_PER_IN).toBe(25.4);
    expect(toStored(1, "length", "imperial")).toBe(25.4);
  });

  it("pound (avoirdupois) → kilogram is exactly 0.45359237 (SP 811: lb → kg 4.5359237 E-01, exact)", () => {
    expect(KG_PER_LB).toBe(0.45359237);
    expect(toStored(1000, "mass", "imperial")).toBeCloseTo(453.59237, 9);
  });

  it("pound-force → newton 4.4482216152605 (SP 811: lbf → N 4.448222 E+00)", () => {
    expect(N_PER_LBF).toBeCloseTo(4.448222, 6);
  });

  it("lbf/in → N/mm 0.17512683524648 (SP 811: lbf/in → N/m 1.751268 E+02)", () => {
    expect(N_PER_MM_PER_LBF_PER_IN).toBeCloseTo(0.17512683524648, 13);
    expect(toStored(1, "springRate", "imperial") * 1000).toBeCloseTo(175.1268, 4);
  });

  it("U.S. gallon → litre 3.785411784 (SP 811: gal (U.S.) → m³ 3.785412 E-03)", () => {
    expect(L_PER_US_GAL * 1e-3).toBeCloseTo(3.785412e-3, 9);
  });

  it("a 500 lbf/in spring is about 87.6 N/mm (spring-maker conversion charts, common practice)", () => {
    expect(toStored(500, "springRate", "imperial")).toBeCloseTo(87.56, 2);
  });

  it("converting there and back returns the input (inverse factors, NIST SP 811 definitions)", () => {
    for (const q of ["length", "mass", "springRate", "force", "volume"] as const) {
      expect(fromStored(toStored(12.345, q, "imperial"), q, "imperial")).toBeCloseTo(12.345, 12);
    }
  });

  it("metric input is stored bit-for-bit (factor 1; mm, kg and N/mm are the stored units)", () => {
    expect(toStored(0.1 + 0.2, "length", "metric")).toBe(0.1 + 0.2);
  });
});

describe("typed numbers", () => {
  it("accepts a decimal comma and rejects text (ISO 80000-1 allows the comma as decimal sign)", () => {
    expect(parseTypedNumber("0,745")).toBe(0.745);
    expect(parseTypedNumber(" 2450 ")).toBe(2450);
    expect(parseTypedNumber("")).toBeUndefined();
    expect(parseTypedNumber("12 N/mm")).toBe(NOT_A_NUMBER);
    expect(parseTypedNumber("1,2,3")).toBe(NOT_A_NUMBER);
  });

  it("an unchanged imperial field keeps the stored value exactly (96.4567 in ≠ 2450 mm after rounding)", () => {
    // 2450 mm / 25.4 = 96.456692... in (NIST SP 811 factor); shown with 6 significant digits.
    const shown = formatForInput(2450, "length", "imperial");
    expect(shown).toBe("96.4567");
    expect(keepIfUnchanged(shown, 2450, "length", "imperial")).toEqual(new StoredValue(2450));
    expect(keepIfUnchanged("97", 2450, "length", "imperial")).toBe("97");
  });
});

// Session details (app/lib/sessions/details.ts) and the Logger profile header signature.
import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { detailsFieldErrors, fuelKgOf, isCalendarDate, looseSessionDetailsSchema, sessionDetailsSchema } from "~/lib/sessions/details";
import { headerSignature } from "~/lib/sessions/logger-profile";

const base = { carId: "car-1", setupId: "setup-1", date: "2026-05-16", venueName: "Kestrel Bank Raceway" };

function errorsOf(input: unknown, schema = sessionDetailsSchema) {
  const parsed = schema.safeParse(input);
  return parsed.success ? {} : detailsFieldErrors(parsed.error);
}

describe("sessionDetailsSchema", () => {
  it("accepts a complete form as typed (strings, decimal comma) and gives numbers and trimmed NFC text", () => {
    const parsed = sessionDetailsSchema.parse({
      ...base,
      venueName: "  Cafe\u0301 Corner  ",
      run: " Run 3 ",
      driverName: "Ines Arbury",
      air: { temp_c: "18,5", pressure_hpa: "1002", humidity_pct: "" },
      fuel_l: { start: "60", end: 22.5 },
      fuelDensityKgPerL: "0.745",
      tyreNotes: "",
      notes: "Sticky rears after lap 6",
    });
    expect(parsed.venueName).toBe("Caf\u00e9 Corner");
    expect(parsed.run).toBe("Run 3");
    expect(parsed.air).toEqual({ temp_c: 18.5, pressure_hpa: 1002, humidity_pct: undefined });
    expect(parsed.fuel_l).toEqual({ start: 60, end: 22.5 });
    expect(parsed.fuelDensityKgPerL).toBe(0.745);
    expect(parsed.tyreNotes).toBeUndefined();
  });

  it("names every missing required field", () => {
    expect(errorsOf({})).toEqual({
      carId: "Choose a car.",
      setupId: "Choose a setup version.",
      date: "Date is required.",
      venueId: "Choose a venue or type its name.",
    });
  });

  it("refuses impossible dates and values out of range, each under its own field", () => {
    const errors = errorsOf({ ...base, date: "2026-02-30", air: { temp_c: "hot", pressure_hpa: 300 }, fuel_l: { start: 10, end: 20 }, fuelDensityKgPerL: 2 });
    expect(errors.date).toBe("Date is not a day of the calendar.");
    expect(errors["air.temp_c"]).toBe('Air temperature: "hot" is not a number.');
    expect(errors["air.pressure_hpa"]).toBe("Air pressure must be between 500 and 1100 hPa.");
    expect(errors["fuel_l.end"]).toBe("Fuel at the end must not be more than at the start.");
    expect(errors.fuelDensityKgPerL).toBe("Fuel density must be between 0.6 and 1 kg/L.");
    expect(errorsOf({ ...base, date: "16/05/2026" }).date).toBe("Date must be written YYYY-MM-DD.");
  });

  it("air needs temperature and pressure together; an untouched group counts as not given", () => {
    expect(errorsOf({ ...base, air: { temp_c: 20 } })["air.pressure_hpa"]).toBe("Air pressure is required.");
    expect(sessionDetailsSchema.parse({ ...base, air: { temp_c: "", pressure_hpa: "" }, fuel_l: { start: "", end: "" } }).air).toBeUndefined();
  });

  it("refuses a venue chosen and typed, and a driver chosen and typed", () => {
    const errors = errorsOf({ ...base, venueId: "v1", driverUserId: "u1", driverName: "Guest" });
    expect(errors.venueName).toMatch(/not both/);
    expect(errors.driverName).toMatch(/not both/);
  });

  it("the loose variant (API, seed) leaves date and venue optional but still checks them", () => {
    expect(looseSessionDetailsSchema.safeParse({ carId: "c", setupId: "s" }).success).toBe(true);
    expect(errorsOf({ carId: "c", setupId: "s", date: "2026-13-01" }, looseSessionDetailsSchema).date).toBe("Date is not a day of the calendar.");
  });

  it("calendar dates follow the Gregorian leap rule (divisible by 4, not by 100 unless by 400; common practice)", () => {
    expect([isCalendarDate("2024-02-29"), isCalendarDate("2100-02-29"), isCalendarDate("2000-02-29"), isCalendarDate("2026-04-31")]).toEqual([true, false, true, false]);
  });

  it("fuel in litres becomes kg with the given density, else the car's (mass = volume × density)", () => {
    expect(fuelKgOf({ fuel_l: { start: 40, end: 10 }, fuelDensityKgPerL: 0.75 })).toEqual({ startKg: 30, endKg: 7.5 });
    expect(fuelKgOf({ fuel_l: { start: 40, end: 10 } }, 0.8)).toEqual({ startKg: 32, endKg: 8 });
    expect(fuelKgOf({})).toBeUndefined();
  });
});

describe("headerSignature", () => {
  it('is the SHA-256 of the column names joined by newlines: one column "abc" gives the FIPS 180-2 example digest', () => {
    // FIPS 180-2, Appendix B.1: SHA-256("abc").
    expect(headerSignature(["abc"])).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  });

  it("agrees with Node's crypto on a real header and changes with the column order", () => {
    const columns = ["Time [s]", "Speed [km/h]", "Lat G", "Damper FL [mm]", "Lenkwinkel °"];
    expect(headerSignature(columns)).toBe(createHash("sha256").update(columns.join("\n"), "utf8").digest("hex"));
    expect(headerSignature([...columns].reverse())).not.toBe(headerSignature(columns));
  });
});

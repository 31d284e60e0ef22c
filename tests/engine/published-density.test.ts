import { describe, expect, it } from "vitest";
import { airDensityKgM3, humidAirDensityKgM3, isaAtGeopotentialM, saturationVapourPressurePa, sessionAirDensity } from "~/engine/density";

describe("air density against the standard atmosphere", () => {
  it("sea level: 288.15 K, 101 325 Pa, 1.225 kg/m³", () => {
    // ISO 2533:1975 / U.S. Standard Atmosphere 1976, sea-level values.
    const s = isaAtGeopotentialM(0);
    expect(s.temp_k).toBeCloseTo(288.15, 6);
    expect(s.pressure_pa).toBeCloseTo(101_325, 3);
    expect(s.density_kg_m3).toBeCloseTo(1.225, 4);
  });

  it("1000 m geopotential: 281.65 K, 89 874.6 Pa, 1.11164 kg/m³", () => {
    // U.S. Standard Atmosphere 1976 table (geopotential altitude 1000 m).
    const s = isaAtGeopotentialM(1000);
    expect(s.temp_k).toBeCloseTo(281.65, 6);
    expect(s.pressure_pa).toBeCloseTo(89_874.6, 0);
    expect(s.density_kg_m3).toBeCloseTo(1.11164, 4);
  });

  it("2000 m geopotential: 275.15 K, 79 495.2 Pa, 1.00649 kg/m³", () => {
    // U.S. Standard Atmosphere 1976 table (geopotential altitude 2000 m).
    const s = isaAtGeopotentialM(2000);
    expect(s.temp_k).toBeCloseTo(275.15, 6);
    expect(s.pressure_pa).toBeCloseTo(79_495.2, 0);
    expect(s.density_kg_m3).toBeCloseTo(1.00649, 4);
  });

  it("ρ = p/(R·T) moves about −0.35 % per +1 K and +1 % per +10 hPa", () => {
    // Ideal-gas sensitivities near 15 °C and 1013 hPa (common practice: 1/288 ≈ 0.35 %, 10/1013 ≈ 1 %).
    const base = airDensityKgM3(288.15, 101_325);
    expect(airDensityKgM3(289.15, 101_325) / base - 1).toBeCloseTo(-0.00346, 4);
    expect(airDensityKgM3(288.15, 102_325) / base - 1).toBeCloseTo(0.00987, 4);
  });

  it("the session density falls back to ISA sea level and says so", () => {
    // ISO 2533 sea level again: 15 °C, 1013.25 hPa → 1.225 kg/m³.
    const d = sessionAirDensity();
    expect(d.source).toBe("isa_sea_level");
    expect(d.density_kg_m3).toBeCloseTo(1.225, 4);
    // 20 °C and 1013.25 hPa: 101 325 / (287.05287 × 293.15) = 1.2041 kg/m³ (ideal gas, dry air).
    expect(sessionAirDensity(20, 1013.25).density_kg_m3).toBeCloseTo(1.2041, 4);
  });
});

describe("moist air (CIPM-2007, Picard et al., Metrologia 45 (2008); constants from memory)", () => {
  it("saturation vapour pressure matches the steam tables", () => {
    // Saturation pressure of water, IAPWS steam tables: 2.3393 kPa at 20 °C, 3.1699 kPa at 25 °C.
    expect(saturationVapourPressurePa(293.15) / 2339.3 - 1).toBeCloseTo(0, 3);
    expect(saturationVapourPressurePa(298.15) / 3169.9 - 1).toBeCloseTo(0, 3);
  });

  it("agrees with the ideal-gas mixture of dry air and water vapour to within CIPM's small corrections", () => {
    // Dalton's law with ideal gases (textbook): ρ = (p − e)/(R_d·T) + e/(R_v·T), R_d 287.058 and
    // R_v 461.495 J/(kg·K); CIPM adds the compressibility Z ≈ 0.9996 and the enhancement factor
    // f ≈ 1.004, together under 0.1 %.
    for (const [tC, h] of [[10, 0.3], [20, 0], [20, 0.5], [25, 0.6], [35, 0.9]]) {
      const T = tC + 273.15, p = 101_325, e = h * saturationVapourPressurePa(T);
      const ideal = (p - e) / (287.058 * T) + e / (461.495 * T);
      expect(Math.abs(humidAirDensityKgM3(T, p, h) / ideal - 1)).toBeLessThan(0.001);
    }
  });

  it("humid air is lighter than dry air, by about 0.7 % at 25 °C and 60 %", () => {
    const dry = airDensityKgM3(298.15, 101_325), humid = humidAirDensityKgM3(298.15, 101_325, 0.6);
    expect(humid / dry - 1).toBeCloseTo(-0.0067, 3);
    expect(sessionAirDensity(25, 1013.25, 60)).toMatchObject({ humidity_pct: 60, source: "given" });
    expect(sessionAirDensity(25, 1013.25).humidity_pct).toBeNull();
  });
});

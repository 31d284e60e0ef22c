import { describe, expect, it } from "vitest";
import { airDensityKgM3, isaAtGeopotentialM, sessionAirDensity } from "~/engine/density";

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

/**
 * Air density for the aero fit.
 *
 * Dry air from a weather reading: ρ = p / (R·T). Constants of the ISA (ISO 2533:1975) and the
 * U.S. Standard Atmosphere 1976 below 11 km: T0 288.15 K, p0 101 325 Pa, lapse −6.5 K/km,
 * g0 9.80665 m/s², R 287.05287 J/(kg·K). Humidity is ignored (it lowers ρ slightly).
 */
export const ISA_SEA_LEVEL_TEMP_K = 288.15;
export const ISA_SEA_LEVEL_PRESSURE_PA = 101_325;
export const AIR_GAS_CONSTANT_J_PER_KG_K = 287.05287;
export const STANDARD_GRAVITY_M_S2 = 9.80665;
const ISA_LAPSE_K_PER_M = -0.0065;

/** ρ = p/(R·T), dry air. */
export function airDensityKgM3(tempK: number, pressurePa: number): number {
  return pressurePa / (AIR_GAS_CONSTANT_J_PER_KG_K * tempK);
}

export interface AtmosphereState {
  temp_k: number;
  pressure_pa: number;
  density_kg_m3: number;
}

/** ISA troposphere (0–11 km geopotential altitude). */
export function isaAtGeopotentialM(altitudeM: number): AtmosphereState {
  if (!(altitudeM >= -5000 && altitudeM <= 11_000)) throw new RangeError("ISA troposphere only: −5 000 to 11 000 m");
  const temp_k = ISA_SEA_LEVEL_TEMP_K + ISA_LAPSE_K_PER_M * altitudeM;
  const exponent = -STANDARD_GRAVITY_M_S2 / (ISA_LAPSE_K_PER_M * AIR_GAS_CONSTANT_J_PER_KG_K);
  const pressure_pa = ISA_SEA_LEVEL_PRESSURE_PA * Math.pow(temp_k / ISA_SEA_LEVEL_TEMP_K, exponent);
  return { temp_k, pressure_pa, density_kg_m3: airDensityKgM3(temp_k, pressure_pa) };
}

/** Density from the CLI/form inputs (°C, hPa); missing values fall back to ISA sea level. */
export function sessionAirDensity(airTempC?: number, airPressureHpa?: number): {
  density_kg_m3: number;
  temp_c: number;
  pressure_hpa: number;
  source: "isa_sea_level" | "given" | "partly_given";
} {
  const givenT = airTempC !== undefined;
  const givenP = airPressureHpa !== undefined;
  const tempK = givenT ? airTempC + 273.15 : ISA_SEA_LEVEL_TEMP_K;
  const pressurePa = givenP ? airPressureHpa * 100 : ISA_SEA_LEVEL_PRESSURE_PA;
  return {
    density_kg_m3: airDensityKgM3(tempK, pressurePa),
    temp_c: tempK - 273.15,
    pressure_hpa: pressurePa / 100,
    source: givenT && givenP ? "given" : givenT || givenP ? "partly_given" : "isa_sea_level",
  };
}

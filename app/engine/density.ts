/**
 * Air density for the aero fit.
 *
 * Dry air from a weather reading: ρ = p / (R·T). Constants of the ISA (ISO 2533:1975) and the
 * U.S. Standard Atmosphere 1976 below 11 km: T0 288.15 K, p0 101 325 Pa, lapse −6.5 K/km,
 * g0 9.80665 m/s², R 287.05287 J/(kg·K).
 *
 * With a relative humidity given, moist air by the CIPM-2007 equation (Picard, Davis, Gläser &
 * Fujii, Metrologia 45 (2008) 149–155; constants from memory): ρ = p·M_a/(Z·R·T)·[1 − x_v(1 − M_v/M_a)],
 * with the saturation vapour pressure, enhancement factor and compressibility of that paper and
 * 400 ppm of CO₂. Humid air is lighter: about −0.7 % at 25 °C and 60 %.
 */
import { STANDARD_GRAVITY_M_PER_S2 } from "./units";

export const ISA_SEA_LEVEL_TEMP_K = 288.15;
export const ISA_SEA_LEVEL_PRESSURE_PA = 101_325;
export const AIR_GAS_CONSTANT_J_PER_KG_K = 287.05287;
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
  const exponent = -STANDARD_GRAVITY_M_PER_S2 / (ISA_LAPSE_K_PER_M * AIR_GAS_CONSTANT_J_PER_KG_K);
  const pressure_pa = ISA_SEA_LEVEL_PRESSURE_PA * Math.pow(temp_k / ISA_SEA_LEVEL_TEMP_K, exponent);
  return { temp_k, pressure_pa, density_kg_m3: airDensityKgM3(temp_k, pressure_pa) };
}

/** Saturation vapour pressure over water (Pa) at T (K), CIPM-2007 (Davis 1992 form). */
export function saturationVapourPressurePa(tempK: number): number {
  return Math.exp(1.2378847e-5 * tempK * tempK - 1.9121316e-2 * tempK + 33.93711047 - 6.3431645e3 / tempK);
}

/** Moist-air density (kg/m³), CIPM-2007, from T (K), p (Pa) and relative humidity 0–1. */
export function humidAirDensityKgM3(tempK: number, pressurePa: number, relativeHumidity: number): number {
  const R = 8.314472, Ma = 28.96546e-3, Mv = 18.01528e-3;
  const t = tempK - 273.15, p = pressurePa, T = tempK;
  const f = 1.00062 + 3.14e-8 * p + 5.6e-7 * t * t;
  const xv = (relativeHumidity * f * saturationVapourPressurePa(T)) / p;
  const Z = 1
    - (p / T) * (1.58123e-6 - 2.9331e-8 * t + 1.1043e-10 * t * t + (5.707e-6 - 2.051e-8 * t) * xv + (1.9898e-4 - 2.376e-6 * t) * xv * xv)
    + ((p * p) / (T * T)) * (1.83e-11 - 0.765e-8 * xv * xv);
  return ((p * Ma) / (Z * R * T)) * (1 - xv * (1 - Mv / Ma));
}

/**
 * Density from the CLI/form inputs (°C, hPa, % relative humidity); a missing temperature or
 * pressure falls back to ISA sea level; no humidity means dry air.
 */
export function sessionAirDensity(airTempC?: number, airPressureHpa?: number, humidityPct?: number): {
  density_kg_m3: number;
  temp_c: number;
  pressure_hpa: number;
  humidity_pct: number | null;
  source: "isa_sea_level" | "given" | "partly_given";
} {
  const givenT = airTempC !== undefined;
  const givenP = airPressureHpa !== undefined;
  const tempK = givenT ? airTempC + 273.15 : ISA_SEA_LEVEL_TEMP_K;
  const pressurePa = givenP ? airPressureHpa * 100 : ISA_SEA_LEVEL_PRESSURE_PA;
  return {
    density_kg_m3: humidityPct === undefined ? airDensityKgM3(tempK, pressurePa) : humidAirDensityKgM3(tempK, pressurePa, humidityPct / 100),
    temp_c: tempK - 273.15,
    pressure_hpa: pressurePa / 100,
    humidity_pct: humidityPct ?? null,
    source: givenT && givenP ? "given" : givenT || givenP ? "partly_given" : "isa_sea_level",
  };
}

/**
 * Engine options from the session details, the way the server's re-check derives them: weather as
 * typed, else ISA at the venue's altitude (ISO 2533:1975, app/engine/density.ts), else the engine's
 * ISA sea level; fuel in litres → kg with the details' density, else the car's (fuelKgOf).
 */
import { isaAtGeopotentialM } from "~/engine/density";
import type { SummaryOptions } from "~/engine/summary-options";
import { fuelKgOf, type SessionDetails } from "~/lib/sessions/details";

export function engineOptionsOf(details: SessionDetails, ctx: { venueAltitudeM: number | null; carFuelDensityKgPerL: number | null }): SummaryOptions {
  const options: SummaryOptions = {};
  if (details.air) {
    options.airTempC = details.air.temp_c;
    options.airPressureHpa = details.air.pressure_hpa;
    if (details.air.humidity_pct !== undefined) options.airHumidityPct = details.air.humidity_pct;
  } else if (ctx.venueAltitudeM !== null) {
    const isa = isaAtGeopotentialM(ctx.venueAltitudeM);
    options.airTempC = isa.temp_k - 273.15;
    options.airPressureHpa = isa.pressure_pa / 100;
  }
  const fuel = fuelKgOf(details, ctx.carFuelDensityKgPerL);
  if (fuel) options.fuel = fuel;
  return options;
}

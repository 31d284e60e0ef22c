/** Options and gates of the streaming summary. Gate values are common practice, not from one source. */
import { DEFAULT_BAND_EDGES_KMH, validateBandEdges } from "./bands";
import { EngineError } from "./errors";
import { validateFuel } from "./fuel";
import type { FuelGiven } from "./fuel";

export interface SummaryGates {
  /** Aero fit: speed floor, |ax| limit after the load-transfer correction, damper velocity and spike limits. */
  aero_min_speed_kmh: number;
  aero_max_long_g: number;
  aero_max_damper_velocity_mm_s: number;
  aero_max_spike_mm: number;
  /** Understeer: quasi-steady cornering gates on the ≈0.2 s smoothed channels. */
  us_min_speed_kmh: number;
  us_min_lat_g: number;
  us_max_lat_fraction_of_peak: number;
  us_max_steer_rate_deg_s: number;
  us_max_lat_jerk_g_s: number;
  us_max_long_g: number;
  /** Straight-line samples for the steering offset. */
  straight_max_lat_g: number;
  straight_max_steer_rate_deg_s: number;
  straight_min_speed_kmh: number;
}

export const DEFAULT_GATES: SummaryGates = {
  aero_min_speed_kmh: 20,
  aero_max_long_g: 0.6,
  aero_max_damper_velocity_mm_s: 250,
  aero_max_spike_mm: 8,
  us_min_speed_kmh: 30,
  us_min_lat_g: 0.2,
  // Off by default (1 = the band's peak): a driver holds steady arcs near the band's peak, and a
  // lower cap would throw those away. Set it below 1 to keep to the tyres' linear range.
  us_max_lat_fraction_of_peak: 1,
  us_max_steer_rate_deg_s: 15,
  us_max_lat_jerk_g_s: 0.5,
  us_max_long_g: 0.1,
  straight_max_lat_g: 0.05,
  straight_max_steer_rate_deg_s: 10,
  straight_min_speed_kmh: 40,
};

export interface SummaryOptions {
  /** Speed-band edges in km/h (default 0, 80, 120, 160, 200, 300). */
  bandEdgesKmh?: number[];
  airTempC?: number;
  airPressureHpa?: number;
  /** Relative humidity (%): moist-air density (CIPM-2007) when given, dry air otherwise. */
  airHumidityPct?: number;
  gates?: Partial<SummaryGates>;
  /** Length of the blocks used for intervals (s), default 1. */
  blockS?: number;
  /**
   * Fuel at the start and at the end of the log (kg). When given, the static-load drift is this
   * known burn (linear in time, split over the axles by the car file's tank position) and is not
   * fitted; without it the drift is fitted on long stints (fuel.ts).
   */
  fuel?: FuelGiven;
  /** Boxcar lengths (s): dampers ≈ 0.11 s (≈4 Hz), understeer gates ≈ 0.2 s. */
  damperSmoothingS?: number;
  gateSmoothingS?: number;
  /** Tyre vertical rate for ride-height estimates (N/mm); 300 is a typical slick (from memory). */
  tyreRateNPerMm?: number;
  /** Buckets per decimated trace (default 2048). */
  traceBuckets?: number;
}

export interface ResolvedOptions {
  bandEdgesKmh: number[];
  airTempC?: number;
  airPressureHpa?: number;
  airHumidityPct?: number;
  gates: SummaryGates;
  fuel: FuelGiven | null;
  blockS: number;
  damperSmoothingS: number;
  gateSmoothingS: number;
  tyreRateNPerMm: number;
  traceBuckets: number;
}

function positive(name: string, v: number | undefined, fallback: number, lo: number, hi: number): number {
  if (v === undefined) return fallback;
  if (typeof v !== "number" || !Number.isFinite(v) || v < lo || v > hi) throw new EngineError("bad_options", `${name} must be a number from ${lo} to ${hi}, got ${String(v)}`);
  return v;
}

export function resolveOptions(o: SummaryOptions = {}): ResolvedOptions {
  const gates = { ...DEFAULT_GATES };
  for (const [k, v] of Object.entries(o.gates ?? {})) {
    if (!(k in DEFAULT_GATES)) throw new EngineError("bad_options", `unknown gate "${k}"`);
    gates[k as keyof SummaryGates] = positive(k, v, DEFAULT_GATES[k as keyof SummaryGates], 0, 1000);
  }
  return {
    bandEdgesKmh: validateBandEdges(o.bandEdgesKmh ?? [...DEFAULT_BAND_EDGES_KMH]),
    airTempC: o.airTempC === undefined ? undefined : positive("air temperature (°C)", o.airTempC, 15, -40, 60),
    airPressureHpa: o.airPressureHpa === undefined ? undefined : positive("air pressure (hPa)", o.airPressureHpa, 1013.25, 500, 1100),
    airHumidityPct: o.airHumidityPct === undefined ? undefined : positive("relative humidity (%)", o.airHumidityPct, 0, 0, 100),
    gates,
    fuel: o.fuel === undefined ? null : validateFuel(o.fuel),
    blockS: positive("block length (s)", o.blockS, 1, 0.1, 60),
    damperSmoothingS: positive("damper smoothing (s)", o.damperSmoothingS, 0.11, 0, 2),
    gateSmoothingS: positive("gate smoothing (s)", o.gateSmoothingS, 0.2, 0, 2),
    tyreRateNPerMm: positive("tyre rate (N/mm)", o.tyreRateNPerMm, 300, 20, 5000),
    traceBuckets: Math.round(positive("trace buckets", o.traceBuckets, 2048, 16, 100_000)),
  };
}

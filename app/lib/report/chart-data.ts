/**
 * Columns for the Balance report's charts, from the summary alone (pure, tested): uPlot wants one
 * sorted x column and one y column per series, null for a gap.
 */
import type { SessionSummary } from "~/engine/summary-types";
import { KMH_PER_M_PER_S } from "~/engine/units";

type Col = (number | null)[];
type Ci = ([number, number] | null)[];

/** ½ρv²·ClA in N at a speed in km/h (dynamic pressure times ClA). */
export function aeroLoadN(densityKgM3: number, speedKmh: number, claM2: number): number {
  const v = speedKmh / KMH_PER_M_PER_S;
  return 0.5 * densityKgM3 * v * v * claM2;
}

const bandsWithSpeed = (s: Pick<SessionSummary, "bands">) => s.bands.filter((b) => b.mean_speed_kmh !== null);

/**
 * Axle aero load against speed: fitted curves on a 5 km/h grid up to the top band's mean speed, and
 * the band points (at their mean speed) with intervals from the band ClA intervals times the band's q.
 */
export function aeroLoadChart(s: Pick<SessionSummary, "bands" | "aero" | "air_density_kg_m3">) {
  const bands = bandsWithSpeed(s);
  const top = Math.max(0, ...bands.map((b) => b.mean_speed_kmh!)) * 1.08;
  const grid: number[] = [];
  for (let v = 0; v <= top; v += 5) grid.push(v);
  const xs = [...new Set([...grid, ...bands.map((b) => b.mean_speed_kmh!)])].sort((a, b) => a - b);
  const curve = (cla: number | null) => xs.map((x) => (cla === null || !grid.includes(x) ? null : aeroLoadN(s.air_density_kg_m3, x, cla)));
  const at = (pick: (b: (typeof bands)[number]) => number | null): Col => xs.map((x) => { const b = bands.find((c) => c.mean_speed_kmh === x); return b ? pick(b) : null; });
  const ciAt = (pick: (b: (typeof bands)[number]) => [number, number] | null): Ci => xs.map((x) => { const b = bands.find((c) => c.mean_speed_kmh === x); return b ? pick(b) : null; });
  const loadCi = (ci: [number, number] | null, q: number | null): [number, number] | null => (ci && q !== null ? [ci[0] * q, ci[1] * q] : null);
  return {
    data: [xs, curve(s.aero.cla_front_m2), curve(s.aero.cla_rear_m2), at((b) => b.aero_load_front_n), at((b) => b.aero_load_rear_n)] as Col[],
    intervals: { 3: ciAt((b) => loadCi(b.cla_front_ci95_m2, b.mean_dynamic_pressure_pa)), 4: ciAt((b) => loadCi(b.cla_rear_ci95_m2, b.mean_dynamic_pressure_pa)) },
  };
}

/** One y per band at its mean speed, with its interval. */
export function bandPointChart(s: Pick<SessionSummary, "bands">, value: (b: SessionSummary["bands"][number]) => number | null, ci: (b: SessionSummary["bands"][number]) => [number, number] | null) {
  const bands = bandsWithSpeed(s);
  return { data: [bands.map((b) => b.mean_speed_kmh!), bands.map(value)] as Col[], intervals: { 1: bands.map(ci) } };
}

/** Ride height (or its change from static) front and rear, and rake, per band at mean speed. */
export function rideHeightChart(s: Pick<SessionSummary, "bands">) {
  const bands = bandsWithSpeed(s);
  const absolute = bands.some((b) => b.ride_height_front_mm !== null);
  return {
    absolute,
    data: [
      bands.map((b) => b.mean_speed_kmh!),
      bands.map((b) => (absolute ? b.ride_height_front_mm : b.ride_height_change_front_mm)),
      bands.map((b) => (absolute ? b.ride_height_rear_mm : b.ride_height_change_rear_mm)),
      bands.map((b) => (absolute ? b.rake_mm : b.rake_change_mm)),
    ] as Col[],
  };
}

/** Balance against the front ride-height change (bin centres), the session's own Ride-height map. */
export function rideHeightMapChart(s: Pick<SessionSummary, "aero_map_front_ride_height">) {
  const bins = [...s.aero_map_front_ride_height].sort((a, b) => a.ride_height_change_front_min_mm - b.ride_height_change_front_min_mm);
  return { data: [bins.map((b) => (b.ride_height_change_front_min_mm + b.ride_height_change_front_max_mm) / 2), bins.map((b) => b.balance_front_pct)] as Col[], samples: bins.map((b) => b.samples) };
}

/** A trace channel's bucket mid-values (the decimated min/max pair's centre), null for a gap. */
export function traceMid(channel: { min: (number | null)[]; max: (number | null)[] } | undefined, length: number): Col {
  if (!channel) return new Array(length).fill(null);
  return channel.min.map((lo, i) => {
    const hi = channel.max[i];
    return lo === null || hi === null ? null : (lo + hi) / 2;
  });
}

/** A y range that holds every value and every interval end, padded by 8 % (null when there is nothing). */
export function rangeWithIntervals(values: (number | null)[], intervals: ([number, number] | null)[]): [number, number] | null {
  const all = [...values, ...intervals.flatMap((c) => (c ? c : []))].filter((v): v is number => v !== null && Number.isFinite(v));
  if (all.length === 0) return null;
  const lo = Math.min(...all);
  const hi = Math.max(...all);
  const pad = hi > lo ? (hi - lo) * 0.08 : Math.max(Math.abs(hi) * 0.05, 0.01);
  return [lo - pad, hi + pad];
}

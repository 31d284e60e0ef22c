/**
 * Unit check by kinematics: the logged longitudinal acceleration and the rate of change of the
 * logged speed are the same quantity (a = dv/dt; common practice, grade and pitch add a little).
 * Their ratio of spreads, `scale` = σ(long_accel) / σ(dv/dt) in the engine's units, is ≈ 1 when both
 * channels are mapped with the right units; the classic mapping slips show as fixed factors.
 */
const G = 9.80665;

/** Ratio band taken as agreement (noise, grade and wheel slip move it a little). */
export const SCALE_OK: readonly [number, number] = [0.7, 1.4];

const SLIPS: { factor: number; problem: string; speed: boolean }[] = [
  { factor: G, problem: "long_accel reads about 9.8 times the change of speed: it is probably logged in m/s² but mapped as g", speed: false },
  { factor: 1 / G, problem: "long_accel reads about a tenth (1/9.8) of the change of speed: it is probably logged in g but mapped as m/s²", speed: false },
  { factor: 3.6, problem: "the speed changes about 3.6 times too slowly for long_accel: speed is probably logged in m/s but mapped as km/h", speed: true },
  { factor: 1 / 3.6, problem: "the speed changes about 3.6 times too fast for long_accel: speed is probably logged in km/h but mapped as m/s", speed: true },
  { factor: 1.609344, problem: "the speed changes about 1.6 times too slowly for long_accel: speed is probably logged in mph but mapped as km/h", speed: true },
  { factor: 1 / 1.609344, problem: "the speed changes about 1.6 times too fast for long_accel: speed is probably logged in km/h but mapped as mph", speed: true },
  { factor: 1 / 0.44704, problem: "the speed changes about 2.2 times too slowly for long_accel: speed is probably logged in m/s but mapped as mph", speed: true },
  { factor: 0.44704, problem: "the speed changes about 2.2 times too fast for long_accel: speed is probably logged in mph but mapped as m/s", speed: true },
];

/**
 * The mapping slip that `scale` points at, or null when the two agree (or there is no scale).
 * `speed` tells whether the speed channel (and so every q and curvature) is the suspect.
 */
export function longAccelScaleProblem(scale: number): { problem: string; speed: boolean } | null {
  if (!Number.isFinite(scale) || scale <= 0 || (scale >= SCALE_OK[0] && scale <= SCALE_OK[1])) return null;
  for (const s of SLIPS) if (Math.abs(Math.log(scale / s.factor)) < Math.log(1.15)) return { problem: s.problem, speed: s.speed };
  return { problem: `long_accel and the change of speed disagree by a factor of ${scale.toFixed(2)}: check the units of speed and long_accel in the channel map`, speed: true };
}

/**
 * Cornering by a test of size: over the running parts of a stint (speed above 80 km/h), the 90th
 * percentile of the decimated traces' per-bucket peak |ay| and |steering-wheel angle| — the
 * stint's faster corners. A car takes those at 0.7–3 g (common practice). Under 0.3 g while the
 * wheel turns 20° or more (at 80 km/h or above that is a real corner on any road or racing car)
 * means g logged but mapped as m/s²; over 6 g means the other way round. A log with no cornering
 * (a straight-line test) is left alone.
 */
export function latAccelScaleProblem(peaks: { latG: number; steerDeg: number }): string | null {
  const { latG, steerDeg } = peaks;
  if (!Number.isFinite(latG)) return null;
  if (latG < 0.3 && steerDeg >= 20) return `lat_accel reaches only ${latG.toFixed(2)} g in the faster corners while the steering wheel turns ${steerDeg.toFixed(0)}°: it is probably logged in g but mapped as m/s²`;
  if (latG > 6) return `lat_accel reaches ${latG.toFixed(1)} g in the faster corners: it is probably logged in m/s² but mapped as g`;
  return null;
}

/** The 90th percentiles of per-bucket peak |ay| (g) and |steer| (deg) over running buckets (speed ≥ 80 km/h), from trace buckets in SI; NaN under 50 buckets. */
export function cornerPeaks(buckets: number, channels: number, lo: Float64Array, hi: Float64Array, idx: { speed: number; lat: number; steer: number }): { latG: number; steerDeg: number } {
  const lat: number[] = [], steer: number[] = [];
  for (let b = 0; b < buckets; b++) {
    const o = b * channels;
    if (!(hi[o + idx.speed] >= 80 / 3.6)) continue;
    const p = Math.max(Math.abs(lo[o + idx.lat]), Math.abs(hi[o + idx.lat]));
    if (Number.isFinite(p)) lat.push(p / G);
    const q = Math.max(Math.abs(lo[o + idx.steer]), Math.abs(hi[o + idx.steer]));
    if (Number.isFinite(q)) steer.push(q);
  }
  const p90 = (a: number[]) => (a.length < 50 ? NaN : a.sort((x, y) => x - y)[Math.floor(0.9 * (a.length - 1))]);
  return { latG: p90(lat), steerDeg: p90(steer) };
}

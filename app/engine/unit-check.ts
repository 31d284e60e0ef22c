/**
 * Unit check by kinematics: the logged longitudinal acceleration and the rate of change of the
 * logged speed are the same quantity (a = dv/dt; common practice, grade and pitch add a little).
 * Their ratio of spreads, `scale` = σ(long_accel) / σ(dv/dt) in the engine's units, is ≈ 1 when both
 * channels are mapped with the right units; the classic mapping slips show as fixed factors.
 */
import { KMH_PER_M_PER_S, STANDARD_GRAVITY_M_PER_S2 } from "./units";

const G = STANDARD_GRAVITY_M_PER_S2;

/** Ratio band taken as agreement (noise, grade and wheel slip move it a little). */
export const SCALE_OK: readonly [number, number] = [0.7, 1.4];

const SLIPS: { factor: number; problem: string; speed: boolean }[] = [
  { factor: G, problem: "long_accel reads about 9.8 times the change of speed: it is probably logged in m/s² but mapped as g", speed: false },
  { factor: 1 / G, problem: "long_accel reads about a tenth (1/9.8) of the change of speed: it is probably logged in g but mapped as m/s²", speed: false },
  { factor: KMH_PER_M_PER_S, problem: "the speed changes about 3.6 times too slowly for long_accel: speed is probably logged in m/s but mapped as km/h", speed: true },
  { factor: 1 / KMH_PER_M_PER_S, problem: "the speed changes about 3.6 times too fast for long_accel: speed is probably logged in km/h but mapped as m/s", speed: true },
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
  return { problem: `long_accel and the change of speed disagree by a factor of ${scale.toPrecision(3)}: check the units of speed and long_accel in the channel map`, speed: true };
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

/**
 * Time by the log's own rate: loggers write from 1 Hz to a few kHz (common practice). A rate under
 * 1 Hz over a log of many rows is milliseconds mapped as seconds; over 5 kHz the other way round.
 */
export function sampleRateProblem(rateHz: number, rows: number): string | null {
  if (!Number.isFinite(rateHz) || rows < 200) return null;
  if (rateHz < 1) return `the log's rate comes out at ${rateHz.toPrecision(2)} Hz: time is probably logged in ms but mapped as s`;
  if (rateHz > 5000) return `the log's rate comes out at ${rateHz.toPrecision(2)} Hz: time is probably logged in s but mapped as ms`;
  return null;
}

/**
 * Damper travel by its range over running (the 5th to the 95th percentile of the trace buckets'
 * lows and highs): over a minute or more of a stint that spans 60 km/h of speed, with its braking, cornering and
 * downforce, a racing damper works over 10–80 mm (common practice). Under 2 mm is inches or metres
 * mapped as mm; over 200 mm is mm mapped as inches (or as metres). Call it only for such a stint.
 */
export function damperRangeProblem(channel: string, rangeMm: number): string | null {
  if (!Number.isFinite(rangeMm)) return null;
  if (rangeMm < 2) return `${channel} moves only ${rangeMm.toFixed(2)} mm over the stint: it is probably logged in inches or metres but mapped as mm`;
  if (rangeMm > 200) return `${channel} moves ${rangeMm.toFixed(0)} mm over the stint: it is probably logged in mm but mapped as inches or metres`;
  return null;
}

/**
 * Steering by the path it drives: in corners the steering-wheel angle is about N·57.3·L/R plus the
 * understeer angle (the steady-state relation, Gillespie ch. 6, from memory), so it runs at one to
 * a few times the kinematic angle. `ratio` = the 90th percentiles' quotient, logged / kinematic.
 */
export function steerScaleProblem(ratio: number): string | null {
  if (!Number.isFinite(ratio) || (ratio >= 0.3 && ratio <= 15)) return null;
  const times = ratio < 1 ? `about 1/${(1 / ratio).toFixed(0)} of` : `about ${ratio.toFixed(0)} times`;
  const unit = ratio < 1 / 20 ? "; it is probably logged in rad but mapped as deg" : ratio > 20 ? "; it is probably logged in deg but mapped as rad" : "";
  return `steer reads ${times} the steering the corners need (steering ratio × 57.3·L/R)${unit || ": check steer's unit (deg or rad) and the car's steering_ratio"}`;
}

/** Percentile p (0–1) of a list (sorted in place); NaN under 50 values. */
function percentile(a: number[], p: number): number {
  return a.length < 50 ? NaN : a.sort((x, y) => x - y)[Math.floor(p * (a.length - 1))];
}

/** Sizes of the mapped channels over running buckets (speed ≥ 80 km/h; damper range over all moving buckets), from the traces in SI. */
export function traceSizes(
  buckets: number, channels: number, lo: Float64Array, hi: Float64Array,
  idx: { speed: number; lat: number; steer: number; dampers: number[] }, steeringRatio: number, wheelbaseM: number,
): { latG: number; steerDeg: number; steerRatio: number; damperRangeMm: number[]; speedSpanKmh: number } {
  const lat: number[] = [], steer: number[] = [], kin: number[] = [], vLo: number[] = [], vHi: number[] = [];
  const dLo: number[][] = idx.dampers.map(() => []), dHi: number[][] = idx.dampers.map(() => []);
  for (let b = 0; b < buckets; b++) {
    const o = b * channels, v = hi[o + idx.speed];
    if (!(v >= 20 / KMH_PER_M_PER_S)) continue;
    vHi.push(v);
    if (Number.isFinite(lo[o + idx.speed])) vLo.push(lo[o + idx.speed]);
    idx.dampers.forEach((k, i) => {
      if (Number.isFinite(lo[o + k]) && Number.isFinite(hi[o + k])) { dLo[i].push(lo[o + k]); dHi[i].push(hi[o + k]); }
    });
    if (!(v >= 80 / KMH_PER_M_PER_S)) continue;
    const ay = Math.max(Math.abs(lo[o + idx.lat]), Math.abs(hi[o + idx.lat]));
    const sw = Math.max(Math.abs(lo[o + idx.steer]), Math.abs(hi[o + idx.steer]));
    if (Number.isFinite(ay)) {
      lat.push(ay / G);
      kin.push((steeringRatio * (180 / Math.PI) * wheelbaseM * ay) / (v * v));
    }
    if (Number.isFinite(sw)) steer.push(sw);
  }
  const steerP90 = percentile(steer, 0.9);
  return {
    latG: percentile(lat, 0.9),
    steerDeg: steerP90,
    steerRatio: steerP90 / percentile(kin, 0.9),
    damperRangeMm: dLo.map((l, i) => percentile(dHi[i], 0.95) - percentile(l, 0.05)),
    speedSpanKmh: (percentile(vHi, 0.95) - percentile(vLo, 0.05)) * KMH_PER_M_PER_S,
  };
}

/**
 * Circuit description and the lap-time-style speed profile of a fictional car along it.
 * A track is straights and constant-radius arcs; curvature ramps linearly (clothoid-like) over a
 * transition either side of each arc. Each arc has the speed the driver takes it at.
 */
export interface TrackSegment {
  /** Length along the centre line (m). */
  length_m: number;
  /** Arc radius (m); positive = left turn, negative = right; absent = straight. */
  radius_m?: number;
  /** Speed through the arc (km/h), capped by the car's grip. */
  target_kmh?: number;
}

export interface TrackLayout {
  name: string;
  segments: TrackSegment[];
  transition_m: number;
}

export interface ProfileCar {
  massKg: number;
  powerW: number;
  cdaM2: number;
  claTotalM2: number;
  muLat: number;
  muBrake: number;
  /** Factor on every corner's target speed (a heavier car takes them a little slower). */
  cornerSpeedFactor: number;
}

export interface SpeedProfile {
  ds: number;
  curvature: Float64Array;
  speed: Float64Array;
  time: Float64Array;
}

const G = 9.80665;

export function trackLength(t: TrackLayout): number {
  return t.segments.reduce((a, s) => a + s.length_m, 0);
}

/** Curvature (1/m) and speed cap (m/s) at ds spacing along `laps` laps after a pit-lane run. */
function pathOf(track: TrackLayout, laps: number, ds: number, pitM: number, pitSpeedMs: number, car: ProfileCar, rho: number, paceByLap?: number[]) {
  const lap = trackLength(track);
  const n = Math.round((pitM + laps * lap) / ds) + 1;
  const kappa = new Float64Array(n);
  const cap = new Float64Array(n).fill(Infinity);
  // Build one lap of curvature and lateral-acceleration targets, then repeat.
  const m = Math.round(lap / ds);
  const k1 = new Float64Array(m);
  const ay1 = new Float64Array(m).fill(Infinity);
  let s0 = 0;
  for (const seg of track.segments) {
    if (seg.radius_m !== undefined) {
      const k = 1 / seg.radius_m;
      const vGrip = gripSpeed(Math.abs(k), car, rho);
      const v = Math.min(((seg.target_kmh ?? Infinity) / 3.6) * car.cornerSpeedFactor, 0.97 * vGrip);
      const ay = v * v * Math.abs(k);
      const tr = track.transition_m;
      for (let j = Math.floor((s0 - tr) / ds); j <= Math.ceil((s0 + seg.length_m + tr) / ds); j++) {
        const s = j * ds;
        const w = s < s0 ? 1 - (s0 - s) / tr : s > s0 + seg.length_m ? 1 - (s - s0 - seg.length_m) / tr : 1;
        if (w <= 0) continue;
        const idx = ((j % m) + m) % m;
        k1[idx] += w * k;
        ay1[idx] = Math.min(ay1[idx], ay);
      }
    }
    s0 += seg.length_m;
  }
  const p0 = Math.round(pitM / ds);
  for (let i = 0; i < n; i++) {
    if (i < p0) { cap[i] = pitSpeedMs; continue; }
    const j = (i - p0) % m;
    kappa[i] = k1[j];
    if (Math.abs(k1[j]) > 1e-6) cap[i] = Math.min(Math.sqrt(ay1[j] / Math.abs(k1[j])) * (paceByLap?.[Math.floor((i - p0) / m)] ?? 1), gripSpeed(Math.abs(k1[j]), car, rho));
  }
  return { kappa, cap };
}

/** Speed at which the lateral grip μ·(m·g + ClA·q) equals m·V²·κ. */
export function gripSpeed(kappa: number, car: ProfileCar, rho: number): number {
  const den = kappa - (car.muLat * rho * car.claTotalM2) / (2 * car.massKg);
  return den <= 0 ? 90 : Math.min(90, Math.sqrt((car.muLat * G) / den));
}

/** `paceByLap`: a factor on each lap's corner speeds (a driver is never the same twice; later laps on a lighter car). */
export function speedProfile(track: TrackLayout, laps: number, car: ProfileCar, rho: number, pitM = 120, pitSpeedMs = 12.5, ds = 0.5, paceByLap?: number[]): SpeedProfile {
  const { kappa, cap } = pathOf(track, laps, ds, pitM, pitSpeedMs, car, rho, paceByLap);
  const n = kappa.length;
  const v = new Float64Array(n);
  v[0] = Math.min(pitSpeedMs, cap[0]);
  for (let i = 0; i + 1 < n; i++) {
    const vi = Math.max(v[i], 1);
    const drive = Math.min(0.9 * G, (car.powerW / vi - 0.5 * rho * car.cdaM2 * vi * vi - 0.015 * car.massKg * G) / car.massKg);
    v[i + 1] = Math.min(cap[i + 1], Math.sqrt(Math.max(0, v[i] * v[i] + 2 * Math.max(drive, 0) * ds)));
  }
  for (let i = n - 2; i >= 0; i--) {
    const vn = v[i + 1];
    const brake = Math.min(1.45 * G, car.muBrake * (G + (0.5 * rho * car.claTotalM2 * vn * vn) / car.massKg)) + (0.5 * rho * car.cdaM2 * vn * vn) / car.massKg;
    v[i] = Math.min(v[i], Math.sqrt(vn * vn + 2 * brake * ds));
  }
  const time = new Float64Array(n);
  for (let i = 0; i + 1 < n; i++) time[i + 1] = time[i] + (2 * ds) / (v[i] + v[i + 1]);
  return { ds, curvature: kappa, speed: v, time };
}

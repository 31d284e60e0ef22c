/**
 * A small lap simulation of a fictional car, with the truth the engine should recover.
 *
 * The car follows the track's curvature at the profile's speed. Known to the simulation:
 * ClA per axle (front ClA rising as the nose drops), bump stops, fuel burn, longitudinal and lateral
 * load transfer, the chassis responding with a first-order lag behind the steering, road noise at
 * the wheels, kerb strikes, sensor noise, a steering-wheel offset, and an understeer gradient from
 * axle cornering stiffness that grows with vertical load (so K changes with speed as the aero loads
 * the axles in a different ratio from the static weight).
 */
import { Prng, resonantNoise } from "./prng";
import { speedProfile } from "./track";
import { BALANCE_SHIFT_MIN_AERO_S, BAND_BALANCE_MIN_LOAD_SHARE } from "../app/engine/bands";
import type { TrackLayout } from "./track";

const G = 9.80665;
const DEG = 180 / Math.PI;

export interface SimAxle { springNPerMm: number; motionRatio: number; bumpGapMm: number; bumpRateNPerMm: number; rollSpringShare: number; staticRideHeightMm: number; corneringCoeffPerRad: number }
export interface SimCar {
  name: string;
  massKg: number; wheelbaseM: number; frontWeightFraction: number; cogHeightM: number; trackWidthM: number;
  steeringRatio: number; steeringOffsetDeg: number; chassisLagS: number;
  claFrontM2: number; claRearM2: number; claFrontPerMmDrop: number; cdaM2: number;
  /** Rear ClA change per mm the rear drops (share of claRearM2 per mm; default 0: rear out of ground effect). */
  claRearPerMmDrop?: number;
  /** Front ClA's curvature in ride height: share of claFrontM2 per mm² of drop (default 0: linear; ground effect steepens as the gap closes). */
  claFrontPerMm2Drop?: number;
  powerW: number; muLat: number; muBrake: number; cornerSpeedFactor: number;
  tyreRateNPerMm: number; loadSensitivity: number;
  fuelBurnKgPerS: number;
  /** Centre of the fuel tank behind the front axle, as the car file gives it (mm): it alone splits the fuel over the axles. */
  fuelTankFromFrontAxleMm: number;
  front: SimAxle; rear: SimAxle;
  staticDamperMm: { fl: number; fr: number; rl: number; rr: number };
}

export interface SimOptions {
  laps: number; rateHz: number; seed: number; airDensityKgM3: number; bandEdgesKmh: number[]; kerbs?: boolean;
  /** Sensor noise (rms): lateral acceleration (m/s², default 0.3) and steering wheel (deg, default 0.15). */
  latNoiseMs2?: number; steerNoiseDeg?: number;
  /** Damper potentiometer noise (rms, mm; default 0.04). */
  damperNoiseMm?: number;
  /** Road input at each wheel and body heave seen at the dampers (rms, mm; defaults 0.9 and 0.25). */
  roadNoiseMm?: number; bodyNoiseMm?: number;
  /** Damper potentiometer resolution (mm; readings rounded to it; default 0: none beyond the export's decimals). */
  damperStepMm?: number;
  /**
   * Motion ratio rising with travel: the wheel force from the spring is Ks·MR·x·(1 + r·x), x damper
   * travel from static (mm), r per mm (default 0: the constant ratio the car file states).
   */
  motionRatioRisePerMm?: number;
  /** Aero load lagging dynamic pressure (first-order time constant, s; default 0). */
  aeroLagS?: number;
  /** Lap-to-lap pace: a spread (sd of a factor on corner speeds, default 0) and a drift over the stint (default 0). */
  paceSpread?: number; paceDrift?: number;
}

/** The fuel's share on the front axle, 1 − x/L from the tank position (moments about the rear axle; common practice). */
export function fuelFrontShare(car: SimCar): number {
  return 1 - car.fuelTankFromFrontAxleMm / 1000 / car.wheelbaseM;
}

/** Columns in SI/engine units (time s, speed m/s, accel m/s², steer deg, dampers mm, ride height mm, yaw deg/s). */
export interface SimColumns {
  time: Float64Array; speed: Float64Array; lat_accel: Float64Array; long_accel: Float64Array; steer: Float64Array;
  damper_fl: Float64Array; damper_fr: Float64Array; damper_rl: Float64Array; damper_rr: Float64Array;
  ride_height_front: Float64Array; ride_height_rear: Float64Array; yaw_rate: Float64Array;
}

export interface SimTruth {
  car: string; track: string; laps: number; rate_hz: number; seed: number; air_density_kg_m3: number;
  cla_front_m2_at_static_ride_height: number; cla_rear_m2: number;
  /** Least-squares slope of the simulation's true axle aero loads against q (running samples). */
  cla_front_m2: number; cla_rear_m2_fit: number; cla_total_m2: number; balance_front_pct: number;
  /** q²-weighted through the origin (Σq·F/Σq²): what the engine's headline ClA and balance estimate. */
  cla_front_m2_q2: number; cla_rear_m2_q2: number; balance_front_pct_q2: number;
  steering_offset_deg: number; fuel_burnt_kg: number; static_load_change_front_n: number; static_load_change_rear_n: number;
  bump_stop_contact_front_pct: number; bump_stop_contact_rear_pct: number;
  bands: { min_kmh: number; max_kmh: number; aero_load_front_n: number | null; aero_load_rear_n: number | null; balance_front_pct: number | null; understeer_gradient_deg_per_g: number | null; steady_samples: number; steady_cornering_s: number;
    /** Mean ride-height change from static over the band's running (suspension and tyre, mm). */
    ride_height_change_front_mm: number | null; ride_height_change_rear_mm: number | null;
    /** Mean ride height over the band's running as a laser reads it without noise (static plus change, mm). */
    ride_height_front_mm: number | null; ride_height_rear_mm: number | null }[];
  /** Balance of the highest band minus the lowest, by the engine's rule (BALANCE_SHIFT_RULE in app/engine/bands.ts) applied to the true loads. */
  balance_shift: { low_band_kmh: [number, number]; high_band_kmh: [number, number]; points: number } | null;
}

function lag(x: Float64Array, dt: number, tau: number): Float64Array {
  const y = new Float64Array(x.length);
  const a = tau > 0 ? dt / (tau + dt) : 1;
  y[0] = x[0];
  for (let i = 1; i < x.length; i++) y[i] = y[i - 1] + a * (x[i] - y[i - 1]);
  return y;
}

/**
 * Wheel travel (mm) from damper travel x: dx/dx_w = MR·(1 + r·x) (the rising ratio's local value),
 * so x_w = ln(1 + r·x)/(r·MR), x/MR when r = 0.
 */
function wheelTravelMm(x: number, mr: number, rise: number): number {
  return rise === 0 ? x / mr : Math.log(1 + rise * x) / (rise * mr);
}

/** Damper travel (mm) of one corner from its spring-force change (N), with the bump stop engaging at the gap. */
function damperTravelMm(dF: number, a: SimAxle, rise = 0): number {
  const k = a.springNPerMm * a.motionRatio;
  // Spring force at the wheel Ks·MR·x·(1 + r·x) = dF, solved for x (the linear x when r = 0).
  const x = rise === 0 ? dF / k : (-1 + Math.sqrt(Math.max(0, 1 + (4 * rise * dF) / k))) / (2 * rise);
  if (x <= a.bumpGapMm || a.bumpRateNPerMm <= 0) return x;
  return a.bumpGapMm + (dF - k * a.bumpGapMm * (1 + rise * a.bumpGapMm)) / ((a.springNPerMm + a.bumpRateNPerMm) * a.motionRatio);
}

function corneringStiffness(cc: number, fz: number, fz0: number, sens: number): number {
  return cc * fz * (1 - sens * (fz / fz0 - 1));
}

export function simulateStint(car: SimCar, track: TrackLayout, o: SimOptions): { columns: SimColumns; truth: SimTruth } {
  const rng = new Prng(o.seed);
  const rho = o.airDensityKgM3;
  // Pace per lap from its own generator, so logs without it keep their noise sequence.
  const paceRng = new Prng(o.seed * 31 + 7);
  const pace = o.paceSpread || o.paceDrift ? Array.from({ length: o.laps }, (_, lap) => 1 + (o.paceDrift ?? 0) * (o.laps > 1 ? lap / (o.laps - 1) : 0) + (o.paceSpread ?? 0) * paceRng.gauss()) : undefined;
  const prof = speedProfile(track, o.laps, { massKg: car.massKg, powerW: car.powerW, cdaM2: car.cdaM2, claTotalM2: car.claFrontM2 + car.claRearM2, muLat: car.muLat, muBrake: car.muBrake, cornerSpeedFactor: car.cornerSpeedFactor }, rho, undefined, undefined, undefined, pace);
  const latNoise = o.latNoiseMs2 ?? 0.3, steerNoise = o.steerNoiseDeg ?? 0.15;
  const frontShare = fuelFrontShare(car);
  const dt = 1 / o.rateHz;
  const total = prof.time[prof.time.length - 1];
  const n = Math.floor(total / dt);
  const V = new Float64Array(n), K = new Float64Array(n), AX = new Float64Array(n);
  let j = 0;
  for (let i = 0; i < n; i++) {
    const t = i * dt;
    while (j + 2 < prof.time.length && prof.time[j + 1] < t) j++;
    const f = (t - prof.time[j]) / (prof.time[j + 1] - prof.time[j]);
    V[i] = prof.speed[j] + f * (prof.speed[j + 1] - prof.speed[j]);
    K[i] = prof.curvature[j] + f * (prof.curvature[j + 1] - prof.curvature[j]);
    AX[i] = (V[i] * (prof.speed[j + 1] - prof.speed[j])) / prof.ds;
  }
  const ayPath = V.map((v, i) => v * v * K[i]);
  const ayChassis = lag(ayPath, dt, car.chassisLagS);
  const yawChassis = lag(V.map((v, i) => v * K[i] * DEG), dt, car.chassisLagS);
  const axChassis = lag(AX, dt, 0.05);
  const road = [0, 1, 2, 3].map((c) => resonantNoise(rng, n, o.rateHz, c < 2 ? 11 : 9, o.roadNoiseMm ?? 0.9));
  const body = resonantNoise(rng, n, o.rateHz, 2.5, o.bodyNoiseMm ?? 0.25);

  const cols: SimColumns = {
    time: new Float64Array(n), speed: new Float64Array(n), lat_accel: new Float64Array(n), long_accel: new Float64Array(n), steer: new Float64Array(n),
    damper_fl: new Float64Array(n), damper_fr: new Float64Array(n), damper_rl: new Float64Array(n), damper_rr: new Float64Array(n),
    ride_height_front: new Float64Array(n), ride_height_rear: new Float64Array(n), yaw_rate: new Float64Array(n),
  };
  const aeroF = new Float64Array(n), aeroR = new Float64Array(n), kTrue = new Float64Array(n);
  // True ride-height change from static at each axle (suspension and tyre, mm; negative = lower).
  const rhF = new Float64Array(n), rhR = new Float64Array(n);
  const L = car.wheelbaseM, h = car.cogHeightM;
  const fz0f = car.massKg * G * car.frontWeightFraction, fz0r = car.massKg * G * (1 - car.frontWeightFraction);
  const kwF = car.front.springNPerMm * car.front.motionRatio ** 2;
  const kwR = car.rear.springNPerMm * car.rear.motionRatio ** 2;
  // Wheel force per mm of damper travel from the springs (Ks·MR), for road input and heave.
  const kF = car.front.springNPerMm * car.front.motionRatio, kR = car.rear.springNPerMm * car.rear.motionRatio;
  const rearSens = car.claRearPerMmDrop ?? 0;
  const damperNoise = o.damperNoiseMm ?? 0.04;
  const rise = o.motionRatioRisePerMm ?? 0, step = o.damperStepMm ?? 0;
  const quant = (x: number) => (step > 0 ? Math.round(x / step) * step : x);
  // Aero load follows dynamic pressure with a lag (flow and ride height settling): the lagged speed's q.
  const Vaero = o.aeroLagS ? lag(V, dt, o.aeroLagS) : V;
  // Physical damper travel from static (load, road, body and kerbs; no sensor noise), and the running gate.
  const travel = [0, 1, 2, 3].map(() => new Float64Array(n));
  const runningRow = new Uint8Array(n);
  let kerb = 0;
  for (let i = 0; i < n; i++) {
    const t = i * dt;
    const fuel = car.fuelBurnKgPerS * t;
    const mass = car.massKg - fuel;
    const q = 0.5 * rho * Vaero[i] * Vaero[i];
    const lt = (-mass * axChassis[i] * h) / L;
    const fuelF = -fuel * G * frontShare, fuelR = -fuel * G * (1 - frontShare);
    // Each axle's ClA depends on its ride height, which depends on its load: iterate.
    let fa = car.claFrontM2 * q, ra = car.claRearM2 * q;
    for (let it = 0; it < 4; it++) {
      const dF = fa + lt + fuelF, dR = ra - lt + fuelR;
      const dropF = dF / 2 / kwF + dF / 2 / car.tyreRateNPerMm;
      const dropR = dR / 2 / kwR + dR / 2 / car.tyreRateNPerMm;
      fa = car.claFrontM2 * q * (1 + car.claFrontPerMmDrop * dropF + (car.claFrontPerMm2Drop ?? 0) * dropF * dropF);
      ra = car.claRearM2 * q * (1 + rearSens * dropR);
    }
    aeroF[i] = fa;
    aeroR[i] = ra;
    const latTotal = (mass * ayChassis[i] * h) / car.trackWidthM;
    const latF = latTotal * car.frontWeightFraction * car.front.rollSpringShare, latR = latTotal * (1 - car.frontWeightFraction) * car.rear.rollSpringShare;
    const axleF = fa + lt + fuelF, axleR = ra - lt + fuelR;
    // ay > 0 (left turn) loads the right-hand wheels.
    const xfl = damperTravelMm(axleF / 2 - latF, car.front, rise), xfr = damperTravelMm(axleF / 2 + latF, car.front, rise);
    const xrl = damperTravelMm(axleR / 2 - latR, car.rear, rise), xrr = damperTravelMm(axleR / 2 + latR, car.rear, rise);
    if (V[i] >= 20 / 3.6 && Math.abs(axChassis[i]) <= 0.6 * G) runningRow[i] = 1;
    // Kerb strike on the inside wheels shortly after some corner exits.
    if (o.kerbs !== false && kerb <= 0 && Math.abs(K[i]) > 1 / 70 && i > 0 && Math.abs(K[i]) < Math.abs(K[i - 1]) && rng.next() < 0.02) kerb = Math.round(0.12 / dt);
    let kf = 0;
    if (kerb > 0) { kf = 12 * Math.sin((Math.PI * kerb) / Math.round(0.12 / dt)); kerb--; }
    const insideLeft = K[i] > 0;
    cols.time[i] = t;
    cols.speed[i] = V[i] * (1 + 0.003 * rng.gauss()) + 0.05 * rng.gauss();
    cols.lat_accel[i] = ayChassis[i] + latNoise * rng.gauss();
    cols.long_accel[i] = axChassis[i] + 0.3 * rng.gauss();
    cols.yaw_rate[i] = yawChassis[i] + 0.3 * rng.gauss();
    const st = car.staticDamperMm;
    // Road input and heave move the wheels against their springs and stops: a force with zero mean,
    // so the travel is the spring-and-stop curve at the load plus that force (the linear spring's
    // travel of `road + body` mm), not the load's travel plus a displacement that carries no force.
    const nF = (k: number) => kF * (road[k][i] + body[i]), nR = (k: number) => kR * (road[k][i] + body[i]);
    travel[0][i] = damperTravelMm(axleF / 2 - latF + nF(0), car.front, rise) + (insideLeft ? kf : 0);
    travel[1][i] = damperTravelMm(axleF / 2 + latF + nF(1), car.front, rise) + (insideLeft ? 0 : kf);
    travel[2][i] = damperTravelMm(axleR / 2 - latR + nR(2), car.rear, rise);
    travel[3][i] = damperTravelMm(axleR / 2 + latR + nR(3), car.rear, rise);
    cols.damper_fl[i] = quant(st.fl + travel[0][i] + damperNoise * rng.gauss());
    cols.damper_fr[i] = quant(st.fr + travel[1][i] + damperNoise * rng.gauss());
    cols.damper_rl[i] = quant(st.rl + travel[2][i] + damperNoise * rng.gauss());
    cols.damper_rr[i] = quant(st.rr + travel[3][i] + damperNoise * rng.gauss());
    rhF[i] = -(wheelTravelMm(xfl, car.front.motionRatio, rise) + wheelTravelMm(xfr, car.front.motionRatio, rise)) / 2 - axleF / 2 / car.tyreRateNPerMm;
    rhR[i] = -(wheelTravelMm(xrl, car.rear.motionRatio, rise) + wheelTravelMm(xrr, car.rear.motionRatio, rise)) / 2 - axleR / 2 / car.tyreRateNPerMm;
    cols.ride_height_front[i] = car.front.staticRideHeightMm + rhF[i] + 0.4 * rng.gauss();
    cols.ride_height_rear[i] = car.rear.staticRideHeightMm + rhR[i] + 0.4 * rng.gauss();
    // Steering: the steady-state relation at the path's demand (the chassis follows with a lag).
    const cf = corneringStiffness(car.front.corneringCoeffPerRad, fz0f + fa, fz0f, car.loadSensitivity);
    const cr = corneringStiffness(car.rear.corneringCoeffPerRad, fz0r + ra, fz0r, car.loadSensitivity);
    kTrue[i] = DEG * (fz0f / cf - fz0r / cr);
    const road_deg = DEG * L * K[i] + kTrue[i] * (ayPath[i] / G);
    cols.steer[i] = car.steeringRatio * road_deg + car.steeringOffsetDeg + steerNoise * rng.gauss();
  }
  const contact = {
    front: contactSharePct(travel[0], travel[1], car.front.bumpGapMm, runningRow, o.rateHz),
    rear: contactSharePct(travel[2], travel[3], car.rear.bumpGapMm, runningRow, o.rateHz),
  };
  return { columns: cols, truth: truthOf(car, track, o, V, AX, ayPath, aeroF, aeroR, kTrue, n * dt, contact, K, rhF, rhR) };
}

/**
 * Share (%) of running rows in which either wheel of an axle is past its bump-stop gap, judged on the
 * physical travel seen through a ≈0.11 s centred moving average (the ≈4 Hz low pass that a load
 * estimate from damper travel applies: faster wheel motion carries no axle load worth the name).
 */
function contactSharePct(left: Float64Array, right: Float64Array, gapMm: number, running: Uint8Array, rateHz: number): number {
  const h = Math.max(1, Math.round((0.11 * rateHz) / 2));
  const n = left.length;
  const mean = (x: Float64Array, i: number) => {
    let s = 0;
    for (let j = i - h; j <= i + h; j++) s += x[j];
    return s / (2 * h + 1);
  };
  let rows = 0, contact = 0;
  for (let i = h; i < n - h; i++) {
    if (!running[i]) continue;
    rows++;
    if (mean(left, i) > gapMm || mean(right, i) > gapMm) contact++;
  }
  return rows > 0 ? (100 * contact) / rows : 0;
}

function truthOf(car: SimCar, track: TrackLayout, o: SimOptions, V: Float64Array, AX: Float64Array, ay: Float64Array, aeroF: Float64Array, aeroR: Float64Array, k: Float64Array, duration: number, contact: { front: number; rear: number }, K: Float64Array, rhF: Float64Array, rhR: Float64Array): SimTruth {
  const rho = o.airDensityKgM3;
  // True aero load vs q, least squares with an intercept, over running samples (|ax| ≤ 0.6 g).
  let n = 0, sq = 0, sqq = 0, sf = 0, sqf = 0, sr = 0, sqr = 0;
  const nb = o.bandEdgesKmh.length - 1;
  const bn = new Float64Array(nb), bf = new Float64Array(nb), br = new Float64Array(nb), kw = new Float64Array(nb), ka = new Float64Array(nb), ks = new Float64Array(nb), arc = new Float64Array(nb);
  const bhF = new Float64Array(nb), bhR = new Float64Array(nb);
  for (let i = 0; i < V.length; i++) {
    const kmh = V[i] * 3.6;
    let b = -1;
    for (let e = 0; e < nb; e++) if (kmh >= o.bandEdgesKmh[e] && kmh < o.bandEdgesKmh[e + 1]) b = e;
    if (V[i] >= 20 / 3.6 && Math.abs(AX[i]) <= 0.6 * G) {
      const q = 0.5 * rho * V[i] * V[i];
      n++; sq += q; sqq += q * q; sf += aeroF[i]; sqf += q * aeroF[i]; sr += aeroR[i]; sqr += q * aeroR[i];
      if (b >= 0) { bn[b]++; bf[b] += aeroF[i]; br[b] += aeroR[i]; bhF[b] += rhF[i]; bhR[b] += rhR[i]; }
    }
    const ayg = Math.abs(ay[i] / G);
    if (b >= 0 && ayg >= 0.2 && Math.abs(AX[i]) <= 0.1 * G) {
      kw[b] += ayg * ayg; ka[b] += k[i] * ayg * ayg; ks[b]++;
      // Steady cornering: on the arc itself (constant curvature, not in a transition) at near-constant speed.
      if (i > 0 && K[i] !== 0 && K[i] === K[i - 1]) arc[b]++;
    }
  }
  const slope = (sy: number, sqy: number) => (sqy - (sq * sy) / n) / (sqq - (sq * sq) / n);
  const claF = slope(sf, sqf), claR = slope(sr, sqr);
  // The q²-weighted ClA (through the origin, Σq·F/Σq²): the engine's headline figure when ClA varies.
  const q2F = sqf / sqq, q2R = sqr / sqq;
  const fuel = car.fuelBurnKgPerS * duration;
  const r4 = (v: number) => Math.round(v * 1e4) / 1e4;
  return {
    car: car.name, track: track.name, laps: o.laps, rate_hz: o.rateHz, seed: o.seed, air_density_kg_m3: rho,
    cla_front_m2_at_static_ride_height: car.claFrontM2, cla_rear_m2: car.claRearM2,
    cla_front_m2: r4(claF), cla_rear_m2_fit: r4(claR), cla_total_m2: r4(claF + claR), balance_front_pct: r4((100 * claF) / (claF + claR)),
    cla_front_m2_q2: r4(q2F), cla_rear_m2_q2: r4(q2R), balance_front_pct_q2: r4((100 * q2F) / (q2F + q2R)),
    steering_offset_deg: car.steeringOffsetDeg, fuel_burnt_kg: r4(fuel),
    static_load_change_front_n: r4(-fuel * G * fuelFrontShare(car)), static_load_change_rear_n: r4(-fuel * G * (1 - fuelFrontShare(car))),
    bump_stop_contact_front_pct: r4(contact.front), bump_stop_contact_rear_pct: r4(contact.rear),
    bands: Array.from({ length: nb }, (_, b) => ({
      min_kmh: o.bandEdgesKmh[b], max_kmh: o.bandEdgesKmh[b + 1],
      aero_load_front_n: bn[b] ? r4(bf[b] / bn[b]) : null,
      aero_load_rear_n: bn[b] ? r4(br[b] / bn[b]) : null,
      balance_front_pct: bn[b] ? r4((100 * bf[b]) / (bf[b] + br[b])) : null,
      understeer_gradient_deg_per_g: ks[b] ? r4(ka[b] / kw[b]) : null,
      steady_samples: ks[b],
      steady_cornering_s: r4(arc[b] / o.rateHz),
      ride_height_change_front_mm: bn[b] ? r4(bhF[b] / bn[b]) : null,
      ride_height_change_rear_mm: bn[b] ? r4(bhR[b] / bn[b]) : null,
      ride_height_front_mm: bn[b] ? r4(car.front.staticRideHeightMm + bhF[b] / bn[b]) : null,
      ride_height_rear_mm: bn[b] ? r4(car.rear.staticRideHeightMm + bhR[b] / bn[b]) : null,
    })),
    balance_shift: balanceShiftOf(o.bandEdgesKmh, bn, bf, br, o.rateHz, car.massKg),
  };
}

/**
 * The truth's balance shift by the engine's rule (BALANCE_SHIFT_RULE, app/engine/bands.ts): bands
 * whose mean aero load is at least 5 % of the car's weight and that hold 20 s of running.
 */
function balanceShiftOf(edges: number[], bn: Float64Array, bf: Float64Array, br: Float64Array, rateHz: number, massKg: number): SimTruth["balance_shift"] {
  const ok: number[] = [];
  for (let b = 0; b < bn.length; b++) if (bn[b] >= BALANCE_SHIFT_MIN_AERO_S * rateHz && (bf[b] + br[b]) / bn[b] > BAND_BALANCE_MIN_LOAD_SHARE * massKg * G) ok.push(b);
  if (ok.length < 2) return null;
  const lo = ok[0], hi = ok[ok.length - 1];
  const bal = (b: number) => (100 * bf[b]) / (bf[b] + br[b]);
  return { low_band_kmh: [edges[lo], edges[lo + 1]], high_band_kmh: [edges[hi], edges[hi + 1]], points: Math.round((bal(hi) - bal(lo)) * 1e4) / 1e4 };
}

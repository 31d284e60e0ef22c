/**
 * Sign evidence: one accumulator and one verdict for the start-of-log check (sign-check.ts) and the
 * session summary (summary-checks.ts), so the two cannot disagree on the same rows.
 *
 * Each test leans on a relation that holds whatever the car (common practice, from the kinematics):
 * - long_accel: the longitudinal acceleration is the rate of change of speed d = dv/dt (speed is a
 *   magnitude, so its sign cannot be wrong): the logged channel must rise and fall with d. The same
 *   sums weigh their sizes (unit-check.ts): a ratio near 9.8, 3.6 or 1.6 is a unit mapped wrongly.
 * - dampers (compression positive): braking pitches the car nose-down, so front dampers compress and
 *   rear ones extend as d goes negative, and downforce compresses all four as q grows. Each corner is
 *   fitted on its own, x = a + b·d + c·q, over near-straight running; a corner is called inverted only
 *   when the pitch term has the wrong sign and the aero term does not have the right one.
 * - lat_accel, steer, yaw_rate (left turn positive for all three): in corners they agree in sign.
 *   With all three logged, the one that disagrees with the other two is the one to invert; with two,
 *   a disagreement is reported without naming a culprit.
 *
 * The sums are plain (Σx, Σxy, …) so a log analysed in parts adds them up. The inputs are the
 * summary's smoothed channels (summary-options.ts smoothing lengths) in SI units.
 */
import { solveNormalEquations } from "./regression";
import { STANDARD_GRAVITY_M_PER_S2 } from "./units";
import { longAccelScaleProblem } from "./unit-check";
import type { ChannelName } from "./types";

const G = STANDARD_GRAVITY_M_PER_S2;
/** ISA sea-level density: the test needs only the sign and shape of q, not its exact size. */
const RHO = 1.225;
/** Speed floor of every test (m/s, 36 km/h). */
export const SIGN_MIN_SPEED_MS = 10;
/** Near-straight running (|ay| below, m/s²) for the dampers, and cornering (|ay| at least) for the lateral channels. */
const STRAIGHT_MS2 = 0.15 * G;
const CORNER_MS2 = 0.3 * G;
/** |dv/dt| that counts as braking or accelerating (m/s²). */
const EVENT_MS2 = 0.15 * G;
/** Least samples (braking or accelerating, near-straight, or cornering) before a test gives a verdict. */
const MIN_EVENT_SAMPLES = 200;
/** Correlation beyond which two channels agree (or, negated, disagree). */
const AGREE_R = 0.3;
/** Damper terms: at least 0.05 mm per m/s² of pitch (0.5 mm per g) and t ≥ 5 to count. */
const MIN_PITCH_MM_PER_MS2 = 0.05;
const MIN_T = 5;

// Layout of the sums. long_accel against d: n, Σd, Σd², Σa, Σa², Σa·d, events.
const A_N = 0, A_D = 1, A_DD = 2, A_A = 3, A_AA = 4, A_AD = 5, A_EV = 6;
// Dampers over near-straight running with all four read: n, Σd, Σq, Σd², Σd·q, Σq², then per corner Σx, Σd·x, Σq·x, Σx².
const D_N = 7, D_D = 8, D_Q = 9, D_DD = 10, D_DQ = 11, D_QQ = 12, D_CORNER = 13;
// Lateral pairs over cornering: steer–lat, yaw–lat, steer–yaw; n, Σx, Σy, Σx², Σy², Σx·y each.
const L_SL = 29, L_YL = 35, L_SY = 41;
export const SIGN_SUMS = 47;

export type SignSums = Float64Array;

export function createSignSums(): SignSums {
  return new Float64Array(SIGN_SUMS);
}

function addPair(s: SignSums, o: number, x: number, y: number): void {
  s[o]++; s[o + 1] += x; s[o + 2] += y; s[o + 3] += x * x; s[o + 4] += y * y; s[o + 5] += x * y;
}

/**
 * The sign evidence of `count` smoothed rows (SI: v m/s, d = dv/dt m/s², ax and ay m/s², steer deg,
 * yaw deg/s, dampers mm; NaN where not logged or dropped out). `flag[j] === 0` skips a row (a part's
 * lead-in or run-out); pass null to take every row. The sums live in locals for the loop and are
 * written back at the end.
 */
export function addSignRows(
  s: SignSums, count: number, flag: Uint8Array | null,
  mV: Float64Array, sV: Float64Array, mAX: Float64Array, mAY: Float64Array, mSTEER: Float64Array, mYAW: Float64Array,
  mFL: Float64Array, mFR: Float64Array, mRL: Float64Array, mRR: Float64Array,
): void {
  let aN = s[A_N], aD = s[A_D], aDD = s[A_DD], aA = s[A_A], aAA = s[A_AA], aAD = s[A_AD], aEv = s[A_EV];
  let dN = s[D_N], dD = s[D_D], dQ = s[D_Q], dDD = s[D_DD], dDQ = s[D_DQ], dQQ = s[D_QQ];
  let c = D_CORNER;
  let fl0 = s[c], fl1 = s[c + 1], fl2 = s[c + 2], fl3 = s[c + 3]; c += 4;
  let fr0 = s[c], fr1 = s[c + 1], fr2 = s[c + 2], fr3 = s[c + 3]; c += 4;
  let rl0 = s[c], rl1 = s[c + 1], rl2 = s[c + 2], rl3 = s[c + 3]; c += 4;
  let rr0 = s[c], rr1 = s[c + 1], rr2 = s[c + 2], rr3 = s[c + 3];
  const halfRho = 0.5 * RHO;
  for (let j = 0; j < count; j++) {
    if (flag !== null && flag[j] === 0) continue;
    const v = mV[j], d = sV[j];
    if (!(v >= SIGN_MIN_SPEED_MS) || d !== d) continue;
    const ax = mAX[j];
    if (ax === ax) {
      aN++; aD += d; aDD += d * d; aA += ax; aAA += ax * ax; aAD += ax * d;
      if (d >= EVENT_MS2 || d <= -EVENT_MS2) aEv++;
    }
    const ay = mAY[j];
    const absAy = ay < 0 ? -ay : ay;
    if (absAy < STRAIGHT_MS2) {
      const xfl = mFL[j], xfr = mFR[j], xrl = mRL[j], xrr = mRR[j];
      if (xfl !== xfl || xfr !== xfr || xrl !== xrl || xrr !== xrr) continue;
      const q = halfRho * v * v;
      dN++; dD += d; dQ += q; dDD += d * d; dDQ += d * q; dQQ += q * q;
      fl0 += xfl; fl1 += d * xfl; fl2 += q * xfl; fl3 += xfl * xfl;
      fr0 += xfr; fr1 += d * xfr; fr2 += q * xfr; fr3 += xfr * xfr;
      rl0 += xrl; rl1 += d * xrl; rl2 += q * xrl; rl3 += xrl * xrl;
      rr0 += xrr; rr1 += d * xrr; rr2 += q * xrr; rr3 += xrr * xrr;
    } else if (absAy >= CORNER_MS2) {
      // Cornering is a minority of rows: the pairs' sums go straight to the array.
      const steer = mSTEER[j], yaw = mYAW[j];
      if (steer === steer) addPair(s, L_SL, steer, ay);
      if (yaw === yaw) addPair(s, L_YL, yaw, ay);
      if (steer === steer && yaw === yaw) addPair(s, L_SY, steer, yaw);
    }
  }
  s[A_N] = aN; s[A_D] = aD; s[A_DD] = aDD; s[A_A] = aA; s[A_AA] = aAA; s[A_AD] = aAD; s[A_EV] = aEv;
  s[D_N] = dN; s[D_D] = dD; s[D_Q] = dQ; s[D_DD] = dDD; s[D_DQ] = dDQ; s[D_QQ] = dQQ;
  c = D_CORNER;
  s[c] = fl0; s[c + 1] = fl1; s[c + 2] = fl2; s[c + 3] = fl3; c += 4;
  s[c] = fr0; s[c + 1] = fr1; s[c + 2] = fr2; s[c + 3] = fr3; c += 4;
  s[c] = rl0; s[c + 1] = rl1; s[c + 2] = rl2; s[c + 3] = rl3; c += 4;
  s[c] = rr0; s[c + 1] = rr1; s[c + 2] = rr2; s[c + 3] = rr3;
}

/**
 * Rows whose smoothing window spans a break in time (a logger restart, a stretch of missing rows):
 * the window's mean time then sits off its centre row's time, and the speed's slope across it
 * (d = dv/dt) is the jump in speed over the break, not an acceleration; one such row squared
 * outweighs minutes of running in σ(dv/dt) and reads as a unit slip. `out[j]` = 1 where row j may
 * count (its `flag` is not 0, or `flag` is null, and |mean time − centre time| < dt), else 0.
 */
export function evenWindowFlags(count: number, flag: Uint8Array | null, meanT: Float64Array, centreT: Float64Array, dt: number, out: Uint8Array): Uint8Array {
  for (let j = 0; j < count; j++) out[j] = (flag === null || flag[j] !== 0) && Math.abs(meanT[j] - centreT[j]) < dt ? 1 : 0;
  return out;
}

/** Pearson correlation of a pair's sums; NaN without spread. */
function pairCorrelation(s: SignSums, o: number): number {
  const n = s[o];
  if (!(n > 2)) return NaN;
  const cxx = s[o + 3] - (s[o + 1] * s[o + 1]) / n, cyy = s[o + 4] - (s[o + 2] * s[o + 2]) / n, cxy = s[o + 5] - (s[o + 1] * s[o + 2]) / n;
  return cxx > 0 && cyy > 0 ? cxy / Math.sqrt(cxx * cyy) : NaN;
}

export interface SignCheck {
  channel: ChannelName;
  /** "check_unit": the sign is right but the size says the mapped unit is not the logged one. */
  verdict: "consistent" | "invert" | "unclear" | "check_unit";
  detail: string;
  /** The channels disagree (a flip is needed, though the log may not tell which): figures resting on them are unsound. */
  conflict?: boolean;
  /** long_accel: the correlation with dv/dt and the size ratio σ(long_accel)/σ(dv/dt). */
  correlation?: number;
  scale?: number;
  /** check_unit: whether the speed channel (so every q and curvature) is the suspect. */
  speedSuspect?: boolean;
}

const DAMPERS = ["damper_fl", "damper_fr", "damper_rl", "damper_rr"] as const;

/**
 * The verdicts for the channels present. `where` names the stretch of log the sums came from ("at
 * the start of the log", "in the log") for the messages.
 */
export function signVerdicts(s: SignSums, present: (c: ChannelName) => boolean, where: string): SignCheck[] {
  const out: SignCheck[] = [];
  if (present("long_accel")) out.push(longAccelVerdict(s, where));
  DAMPERS.forEach((ch, c) => {
    if (present(ch)) out.push(damperVerdict(s, ch, c, where));
  });
  out.push(...lateralVerdicts(s, present("steer"), present("yaw_rate"), where));
  return out;
}

/** long_accel's sign against dv/dt, then its size (unit-check.ts): a unit slip names long_accel or speed. */
function longAccelVerdict(s: SignSums, where: string): SignCheck {
  const channel = "long_accel";
  const n = s[A_N];
  const varD = s[A_DD] / n - (s[A_D] / n) ** 2, varA = s[A_AA] / n - (s[A_A] / n) ** 2;
  const r = (s[A_AD] / n - (s[A_A] / n) * (s[A_D] / n)) / Math.sqrt(varD * varA);
  const scale = Math.sqrt(varA / varD);
  const base = { correlation: r, scale };
  if (s[A_EV] < MIN_EVENT_SAMPLES || !Number.isFinite(r)) return { channel, verdict: "unclear", detail: `too little braking or accelerating above 36 km/h ${where} to check the sign`, ...base };
  if (r <= -AGREE_R) return { channel, verdict: "invert", detail: `reads opposite to the change of speed (correlation ${r.toFixed(2)}): braking must read negative`, conflict: true, ...base };
  if (r < AGREE_R) return { channel, verdict: "unclear", detail: `barely follows the change of speed (correlation ${r.toFixed(2)}): check the column and its unit`, ...base };
  const slip = longAccelScaleProblem(scale);
  if (!slip) return { channel, verdict: "consistent", detail: `follows the change of speed (correlation ${r.toFixed(2)}, size ratio ${scale.toFixed(2)})`, ...base };
  return { channel: slip.speed ? "speed" : "long_accel", verdict: "check_unit", detail: slip.problem, speedSuspect: slip.speed, ...base };
}

function damperVerdict(s: SignSums, channel: (typeof DAMPERS)[number], corner: number, where: string): SignCheck {
  const o = D_CORNER + 4 * corner;
  const xtx = [s[D_N], s[D_D], s[D_Q], s[D_D], s[D_DD], s[D_DQ], s[D_Q], s[D_DQ], s[D_QQ]];
  const fit = s[D_N] >= MIN_EVENT_SAMPLES ? solveNormalEquations(xtx, [s[o], s[o + 1], s[o + 2]], s[o + 3], s[D_N], 3) : null;
  if (!fit) return { channel, verdict: "unclear", detail: `too little near-straight running above 36 km/h ${where} to check the sign` };
  const front = corner < 2;
  const b = fit.beta[1], c = fit.beta[2];
  const tb = b / fit.se[1], tc = c / fit.se[2];
  // Pitch term in the expected direction: front b < 0 (compresses under braking), rear b > 0.
  const pitch = front ? -b : b, pitchT = front ? -tb : tb;
  const pitchRight = pitch >= MIN_PITCH_MM_PER_MS2 && pitchT >= MIN_T, pitchWrong = -pitch >= MIN_PITCH_MM_PER_MS2 && -pitchT >= MIN_T;
  const aeroRight = tc >= MIN_T, aeroWrong = -tc >= MIN_T;
  const underBraking = -b * G;
  const how = `${underBraking > 0 ? "compresses" : "extends"} ${Math.abs(underBraking).toFixed(1)} mm per g of braking`;
  const rule = front ? "a front damper must compress under braking" : "a rear damper must extend under braking";
  if (pitchWrong && !aeroRight) return { channel, verdict: "invert", detail: `${how}${aeroWrong ? " and extends as downforce grows" : ""}: ${rule} (compression positive)`, conflict: true };
  if (pitchRight && !aeroWrong) return { channel, verdict: "consistent", detail: `${how}${aeroRight ? " and compresses as downforce grows" : ""}` };
  return { channel, verdict: "unclear", detail: `pitch and downforce do not tell a clear sign ${where}` };
}

function lateralVerdicts(s: SignSums, hasSteer: boolean, hasYaw: boolean, where: string): SignCheck[] {
  const sign = (o: number) => {
    const r = pairCorrelation(s, o);
    return s[o] < MIN_EVENT_SAMPLES || !Number.isFinite(r) ? 0 : r >= AGREE_R ? 1 : r <= -AGREE_R ? -1 : 0;
  };
  const few = `too little cornering above 36 km/h ${where} to check the sign`;
  const names: ChannelName[] = ["lat_accel", ...(hasSteer ? (["steer"] as const) : []), ...(hasYaw ? (["yaw_rate"] as const) : [])];
  const all = (verdict: SignCheck["verdict"], detail: string, conflict = false) => names.map((channel) => ({ channel, verdict, detail, ...(conflict ? { conflict } : {}) }));
  if (hasSteer && hasYaw) {
    const sl = sign(L_SL), yl = sign(L_YL), sy = sign(L_SY);
    if (sl === 0 || yl === 0 || sy === 0) return all("unclear", few);
    if (sl > 0 && yl > 0 && sy > 0) return all("consistent", "lat_accel, steer and yaw_rate agree in sign in corners");
    // Exactly one pair agrees when one channel is flipped: the channel outside that pair is the odd one.
    const odd: ChannelName | null = sl > 0 && yl < 0 && sy < 0 ? "yaw_rate" : yl > 0 && sl < 0 && sy < 0 ? "steer" : sy > 0 && sl < 0 && yl < 0 ? "lat_accel" : null;
    if (!odd) return all("unclear", "lat_accel, steer and yaw_rate disagree in sign in corners in a way no single flip explains: check the columns", true);
    return names.map((channel) => channel === odd
      ? { channel, verdict: "invert" as const, detail: "has the opposite sign to the other two in corners (left turn positive for all three)", conflict: true }
      : { channel, verdict: "consistent" as const, detail: `agrees with ${names.filter((n) => n !== odd && n !== channel).join(" and ")} in corners` });
  }
  if (!hasSteer && !hasYaw) return [{ channel: "lat_accel", verdict: "unclear", detail: "no steer or yaw_rate channel to check the sign against" }];
  const other = hasSteer ? "steer" : "yaw_rate";
  const p = sign(hasSteer ? L_SL : L_YL);
  if (p === 0) return all("unclear", few);
  if (p > 0) return all("consistent", `lat_accel and ${other} agree in sign in corners`);
  return all("unclear", `lat_accel and ${other} have opposite signs in corners: invert one of them (left turn positive for both); the log alone cannot tell which`, true);
}

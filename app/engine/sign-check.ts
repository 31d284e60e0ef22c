/**
 * Sign check on the first minutes of a log, for the mapping step: before a whole file is analysed,
 * does each channel read with the sign the engine expects, given the map as it stands?
 *
 * Each test leans on a relation that holds whatever the car (common practice, from the kinematics):
 * - long_accel: the longitudinal acceleration is the rate of change of speed (speed is a magnitude,
 *   so its sign cannot be wrong); the logged channel must rise and fall with dv/dt.
 * - dampers (compression positive): braking pitches the car nose-down, so front dampers compress
 *   and rear ones extend as dv/dt goes negative, and downforce compresses all four as q grows. Each
 *   corner is fitted on its own, x = a + b·dv/dt + c·q, over near-straight running; a corner is
 *   called inverted only when the pitch and the aero terms both have the wrong sign.
 * - lat_accel, steer, yaw_rate (left turn positive for all three): in corners they agree in sign.
 *   With all three logged, the one that disagrees with the other two is the one to invert; with
 *   two, a disagreement is reported without naming a culprit.
 *
 * The same test of long_accel against dv/dt also weighs their sizes (unit-check.ts): a ratio near
 * 9.8, 3.6 or 1.6 is a unit mapped wrongly, reported as "check_unit" on long_accel or speed.
 *
 * Verdicts are relative to the map given: "invert" means flip that channel's `invert` flag.
 * A verdict is a proposal for the user to confirm, never applied silently.
 */
import { STANDARD_GRAVITY_M_PER_S2 } from "./units";
import { EngineError } from "./errors";
import { BlockSmoother } from "./filters";
import { ingestLog } from "./ingest";
import { LineAccumulator, solveNormalEquations } from "./regression";
import { longAccelScaleProblem } from "./unit-check";
import { copyBlock, estimateDt } from "./summary-blocks";
import type { ChannelBlock, ChannelMap, ChannelName } from "./types";

export interface SignCheck {
  channel: ChannelName;
  /** "check_unit": the sign is right but the size says the mapped unit is not the logged one. */
  verdict: "consistent" | "invert" | "unclear" | "check_unit";
  detail: string;
}

const G = STANDARD_GRAVITY_M_PER_S2;
/** ISA sea-level density: the check needs only the sign and shape of q, not its exact size. */
const RHO = 1.225;
/** Smoothing window (s) for every channel, and the speed floor of the tests (m/s, 36 km/h). */
const SMOOTH_S = 0.2;
const MIN_SPEED_MS = 10;
/** Running that counts as near-straight (|ay| below) and as cornering (|ay| at least), in g. */
const STRAIGHT_G = 0.15;
const CORNER_G = 0.3;
/** Least samples with |dv/dt| ≥ 0.15 g, or in corners, before a test gives a verdict. */
const MIN_EVENT_SAMPLES = 200;
/** Correlation beyond which two channels agree (or, negated, disagree). */
const AGREE_R = 0.3;
/** Damper terms: at least 0.05 mm per m/s² of pitch (0.5 mm per g) and t ≥ 5 to count. */
const MIN_PITCH_MM_PER_MS2 = 0.05;
const MIN_T = 5;

const CHANNELS = ["speed", "long_accel", "lat_accel", "steer", "yaw_rate", "damper_fl", "damper_fr", "damper_rl", "damper_rr"] as const;
const V = 0, AX = 1, AY = 2, STEER = 3, YAW = 4, D0 = 5;
const DAMPERS = ["damper_fl", "damper_fr", "damper_rl", "damper_rr"] as const;

/** Cuts `head` after its last line end (a preview read from the start of a file ends mid-row). */
function wholeRows(head: Uint8Array): Uint8Array {
  let end = head.length;
  while (end > 0 && head[end - 1] !== 10) end--;
  return head.subarray(0, end);
}

/** Pearson correlation of a line accumulator's x and y; NaN without spread. */
function correlation(a: LineAccumulator): number {
  return a.n > 2 && a.cxx > 0 && a.cyy > 0 ? a.cxy / Math.sqrt(a.cxx * a.cyy) : NaN;
}

/** σ(y)/σ(x): the size of y against x (both noisy, so not the regression slope). */
function sizeRatio(a: LineAccumulator): number {
  return a.n > 2 && a.cxx > 0 ? Math.sqrt(a.cyy / a.cxx) : NaN;
}

/** Normal equations for x = a + b·d + c·q, one per damper corner. */
class DamperFit {
  readonly xtx = new Float64Array(9);
  readonly xty = new Float64Array(3);
  yty = 0;
  n = 0;
  add(d: number, q: number, x: number): void {
    const r = [1, d, q];
    for (let i = 0; i < 3; i++) {
      this.xty[i] += r[i] * x;
      for (let j = 0; j < 3; j++) this.xtx[i * 3 + j] += r[i] * r[j];
    }
    this.yty += x * x;
    this.n++;
  }
}

/**
 * Checks the signs of the mapped channels on the first rows of a log (`head`: the file's first
 * bytes; a few megabytes, some minutes of running, are plenty).
 */
export async function checkChannelSigns(head: Uint8Array, map: ChannelMap): Promise<SignCheck[]> {
  const blocks: ChannelBlock[] = [];
  const bytes = wholeRows(head);
  await ingestLog((async function* () { yield bytes; })(), map, { onBlock: (b) => blocks.push(copyBlock(b)) });
  const dt = estimateDt(blocks);
  if (dt === null) throw new EngineError("too_few_rows", "the start of the log has too few rows to check the channels' signs");
  const h = Math.max(1, Math.round(SMOOTH_S / dt / 2));
  const present = CHANNELS.map((c) => map[c] !== undefined);
  const sm = new BlockSmoother(CHANNELS.map(() => h), dt, CHANNELS.map((_, i) => i === V));

  const accel = new LineAccumulator();
  let accelEvents = 0;
  const dampers = DAMPERS.map(() => new DamperFit());
  const steerLat = new LineAccumulator(), yawLat = new LineAccumulator(), steerYaw = new LineAccumulator();
  const cols: (Float64Array | null)[] = new Array(CHANNELS.length).fill(null);
  const consume = (count: number) => {
    const m = sm.mean, dv = sm.slope[V];
    for (let j = 0; j < count; j++) {
      const v = m[V][j], d = dv[j];
      if (!(v >= MIN_SPEED_MS) || d !== d) continue;
      const ax = m[AX][j], ay = m[AY][j];
      if (ax === ax) {
        accel.add(d, ax);
        if (Math.abs(d) >= 0.15 * G) accelEvents++;
      }
      if (ay !== ay) continue;
      if (Math.abs(ay) < STRAIGHT_G * G) {
        const q = 0.5 * RHO * v * v;
        for (let c = 0; c < 4; c++) {
          const x = m[D0 + c][j];
          if (x === x) dampers[c].add(d, q, x);
        }
      } else if (Math.abs(ay) >= CORNER_G * G) {
        const st = m[STEER][j], yaw = m[YAW][j];
        if (st === st) steerLat.add(st, ay);
        if (yaw === yaw) yawLat.add(yaw, ay);
        if (st === st && yaw === yaw) steerYaw.add(st, yaw);
      }
    }
  };
  for (const b of blocks) {
    CHANNELS.forEach((c, k) => (cols[k] = b.channels[c] ?? null));
    consume(sm.push(cols, b.rows));
  }
  consume(sm.flush());

  const out: SignCheck[] = [];
  if (present[AX]) out.push(...longAccelChecks(correlation(accel), sizeRatio(accel), accelEvents));
  DAMPERS.forEach((ch, c) => {
    if (present[D0 + c]) out.push(damperCheck(ch, c < 2, dampers[c]));
  });
  out.push(...lateralChecks(present[STEER], present[YAW], steerLat, yawLat, steerYaw));
  return out;
}

/** long_accel's sign against dv/dt, then its size (unit-check.ts): a unit slip names long_accel or speed. */
function longAccelChecks(r: number, scale: number, events: number): SignCheck[] {
  const channel = "long_accel";
  if (events < MIN_EVENT_SAMPLES || !Number.isFinite(r)) return [{ channel, verdict: "unclear", detail: "too little braking or accelerating above 36 km/h at the start of the log to check the sign" }];
  if (r <= -AGREE_R) return [{ channel, verdict: "invert", detail: `reads opposite to the change of speed (correlation ${r.toFixed(2)}): braking must read negative` }];
  if (r < AGREE_R) return [{ channel, verdict: "unclear", detail: `barely follows the change of speed (correlation ${r.toFixed(2)}): check the column and its unit` }];
  const slip = longAccelScaleProblem(scale);
  if (!slip) return [{ channel, verdict: "consistent", detail: `follows the change of speed (correlation ${r.toFixed(2)}, size ratio ${scale.toFixed(2)})` }];
  return [{ channel: slip.speed ? "speed" : "long_accel", verdict: "check_unit", detail: slip.problem }];
}

function damperCheck(channel: (typeof DAMPERS)[number], front: boolean, f: DamperFit): SignCheck {
  const fit = solveNormalEquations(f.xtx, f.xty, f.yty, f.n, 3);
  if (!fit || f.n < MIN_EVENT_SAMPLES) return { channel, verdict: "unclear", detail: "too little near-straight running above 36 km/h at the start of the log to check the sign" };
  const b = fit.beta[1], c = fit.beta[2];
  const tb = b / fit.se[1], tc = c / fit.se[2];
  // Pitch term in the expected direction: front b < 0 (compresses under braking), rear b > 0.
  const pitch = front ? -b : b, pitchT = front ? -tb : tb;
  const pitchRight = pitch >= MIN_PITCH_MM_PER_MS2 && pitchT >= MIN_T, pitchWrong = -pitch >= MIN_PITCH_MM_PER_MS2 && -pitchT >= MIN_T;
  const aeroRight = tc >= MIN_T, aeroWrong = -tc >= MIN_T;
  const underBraking = -b * G;
  const how = `${underBraking > 0 ? "compresses" : "extends"} ${Math.abs(underBraking).toFixed(1)} mm per g of braking`;
  const rule = front ? "a front damper must compress under braking" : "a rear damper must extend under braking";
  if (pitchWrong && !aeroRight) return { channel, verdict: "invert", detail: `${how}${aeroWrong ? " and extends as downforce grows" : ""}: ${rule} (compression positive)` };
  if (pitchRight && !aeroWrong) return { channel, verdict: "consistent", detail: `${how}${aeroRight ? " and compresses as downforce grows" : ""}` };
  return { channel, verdict: "unclear", detail: "pitch and downforce do not tell a clear sign at the start of the log" };
}

function lateralChecks(hasSteer: boolean, hasYaw: boolean, steerLat: LineAccumulator, yawLat: LineAccumulator, steerYaw: LineAccumulator): SignCheck[] {
  const sign = (c: LineAccumulator) => {
    const r = correlation(c);
    return c.n < MIN_EVENT_SAMPLES || !Number.isFinite(r) ? 0 : r >= AGREE_R ? 1 : r <= -AGREE_R ? -1 : 0;
  };
  const few = "too little cornering above 36 km/h at the start of the log to check the sign";
  const names: ChannelName[] = ["lat_accel", ...(hasSteer ? (["steer"] as const) : []), ...(hasYaw ? (["yaw_rate"] as const) : [])];
  const all = (verdict: SignCheck["verdict"], detail: string) => names.map((channel) => ({ channel, verdict, detail }));
  if (hasSteer && hasYaw) {
    const sl = sign(steerLat), yl = sign(yawLat), sy = sign(steerYaw);
    if (sl === 0 || yl === 0 || sy === 0) return all("unclear", few);
    if (sl > 0 && yl > 0 && sy > 0) return all("consistent", "lat_accel, steer and yaw_rate agree in sign in corners");
    // Exactly one pair agrees when one channel is flipped: the channel outside that pair is the odd one.
    const odd: ChannelName | null = sl > 0 && yl < 0 && sy < 0 ? "yaw_rate" : yl > 0 && sl < 0 && sy < 0 ? "steer" : sy > 0 && sl < 0 && yl < 0 ? "lat_accel" : null;
    if (!odd) return all("unclear", "lat_accel, steer and yaw_rate disagree in sign in corners in a way no single flip explains: check the columns");
    return names.map((channel) => channel === odd
      ? { channel, verdict: "invert" as const, detail: `has the opposite sign to the other two in corners (left turn positive for all three)` }
      : { channel, verdict: "consistent" as const, detail: `agrees with ${names.filter((n) => n !== odd && n !== channel).join(" and ")} in corners` });
  }
  if (!hasSteer && !hasYaw) return [{ channel: "lat_accel", verdict: "unclear", detail: "no steer or yaw_rate channel to check the sign against" }];
  const pair = hasSteer ? steerLat : yawLat, other = hasSteer ? "steer" : "yaw_rate";
  const s = sign(pair);
  if (s === 0) return all("unclear", few);
  if (s > 0) return all("consistent", `lat_accel and ${other} agree in sign in corners`);
  return all("unclear", `lat_accel and ${other} have opposite signs in corners: invert one of them (left turn positive for both); the log alone cannot tell which`);
}

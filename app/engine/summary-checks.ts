/**
 * Stage 2 of the summary: channel checks. Signs from the sign evidence the row loop gathered (the
 * same accumulator and verdict as the start-of-log check, sign-evidence.ts), units from the sizes of
 * the channels (unit-check.ts). A figure resting on a channel found inverted or mis-scaled is not
 * given; the warning names the channel and says which figures wait for it.
 */
import { signVerdicts } from "./sign-evidence";
import type { SignCheck } from "./sign-evidence";
import type { SummaryState } from "./summary-state";
import { TRACE_CHANNELS } from "./summary-traces";
import type { ChannelName } from "./types";
import { damperRangeProblem, latAccelScaleProblem, sampleRateProblem, steerScaleProblem, traceSizes } from "./unit-check";

export type Warn = (code: string, message: string) => void;

export interface ChannelChecks {
  /** ClA, balance and CoP cannot be given (long_accel or a damper inverted, a unit slip). */
  aeroBlocked: boolean;
  /** Understeer gradients cannot be given (lateral channels disagree, a unit slip). */
  understeerBlocked: boolean;
  verdicts: SignCheck[];
}

const UNTIL_AERO = "ClA and balance are not estimated until then";
const UNTIL_US = "understeer gradients are not given until then";
const WORDS: Partial<Record<ChannelName, string>> = { steer: "steering", lat_accel: "lateral acceleration", yaw_rate: "yaw rate" };

export function channelChecks(s: SummaryState, duration: number, warn: Warn): ChannelChecks {
  const verdicts = signVerdicts(s.sign, (c) => s.mapped.has(c), "in the log");
  const of = (c: ChannelName) => verdicts.find((v) => v.channel === c);
  let aeroBlocked = false, understeerBlocked = false;

  // long_accel against the change of speed: logged the other way, the load-transfer correction would go the wrong way.
  const ax = of("long_accel");
  if (ax?.verdict === "invert") {
    aeroBlocked = true;
    warn("suspected_sign_error", `long_accel reads opposite to the change of speed (correlation ${ax.correlation!.toFixed(2)}): invert it in the channel map (braking negative). ClA and balance are not estimated until then: the load-transfer correction would go the wrong way`);
  }
  // Units by the same kinematics. A time unit slip (the log's rate) explains any disagreement of sizes with dv/dt: it is named alone.
  const rateSlip = sampleRateProblem(s.sampleRateHz, s.rows);
  if (rateSlip) {
    aeroBlocked = understeerBlocked = true;
    warn("suspected_unit_error", `${rateSlip}. ClA, balance and understeer gradients are not estimated until then`);
  }
  const unit = rateSlip ? undefined : verdicts.find((v) => v.verdict === "check_unit" && (v.channel === "long_accel" || v.channel === "speed"));
  if (unit) {
    aeroBlocked = true;
    if (unit.speedSuspect) understeerBlocked = true;
    warn("suspected_unit_error", `${unit.detail}. ${unit.speedSuspect ? "ClA, balance and understeer gradients are" : "ClA and balance are"} not estimated until then`);
  }
  // Sizes of the other channels, read off the decimated traces.
  const c = s.model;
  const tr = s.traces.state();
  const at = (name: (typeof TRACE_CHANNELS)[number]) => TRACE_CHANNELS.indexOf(name);
  const sizes = traceSizes(tr.buckets, TRACE_CHANNELS.length, tr.lo, tr.hi, {
    speed: at("speed_kmh"), lat: at("lat_accel_g"), steer: at("steer_deg"), dampers: [at("damper_fl_mm"), at("damper_fr_mm"), at("damper_rl_mm"), at("damper_rr_mm")],
  }, c.steeringRatio, c.wheelbaseM);
  const damperSlips = sizes.speedSpanKmh < 60 || duration < 60 ? [] : (["damper_fl", "damper_fr", "damper_rl", "damper_rr"] as const).map((ch, i) => damperRangeProblem(ch, sizes.damperRangeMm[i])).filter((p): p is string => p !== null);
  for (const p of damperSlips) {
    aeroBlocked = true;
    warn("suspected_unit_error", `${p}. ${UNTIL_AERO}`);
  }
  const latSlip = latAccelScaleProblem(sizes);
  if (latSlip) {
    understeerBlocked = true;
    warn("suspected_unit_error", `${latSlip}. Understeer gradients are not estimated until then`);
  }
  const steerSlip = latSlip || unit?.speedSuspect ? null : steerScaleProblem(sizes.steerRatio);
  if (steerSlip) {
    understeerBlocked = true;
    warn("suspected_unit_error", `${steerSlip}. Understeer gradients are not estimated until then`);
  }

  // Dampers against braking pitch, per corner, named per axle: compression positive, braking compresses the front.
  for (const [axle, corners, how] of [["front", ["damper_fl", "damper_fr"], "extend under braking"], ["rear", ["damper_rl", "damper_rr"], "compress under braking"]] as const) {
    const wrong = corners.filter((ch) => of(ch)?.verdict === "invert");
    if (!wrong.length) continue;
    aeroBlocked = true;
    warn("suspected_sign_error", `the ${axle} dampers ${how} (${wrong.join(", ")}: ${of(wrong[0])!.detail}): check their invert flag in the channel map; ${UNTIL_AERO}`);
  }

  // Steering, lateral acceleration and yaw rate against each other (left turn positive for all three).
  const lateral = verdicts.filter((v) => (v.channel === "lat_accel" || v.channel === "steer" || v.channel === "yaw_rate") && v.conflict);
  if (lateral.length) {
    understeerBlocked = true;
    const odd = lateral.find((v) => v.verdict === "invert");
    const pair = s.mapped.has("steer") ? "steer" : "yaw_rate";
    let message: string;
    if (odd?.channel === "lat_accel") message = "lateral acceleration has the opposite sign to steering and yaw rate in corners: invert lat_accel in the channel map";
    else if (odd) message = `${WORDS[odd.channel]} and lateral acceleration have opposite signs in corners (${odd.channel === "steer" ? "yaw rate" : "steering"} agrees with lateral acceleration): invert ${odd.channel} in the channel map`;
    else if (s.mapped.has("steer") && s.mapped.has("yaw_rate")) message = `${lateral[0].detail}`;
    else message = `${WORDS[pair]} and lateral acceleration have opposite signs in corners: invert one of them in the channel map (left turn positive for both)`;
    warn("suspected_sign_error", `${message}; ${UNTIL_US}`);
  }
  return { aeroBlocked, understeerBlocked, verdicts };
}

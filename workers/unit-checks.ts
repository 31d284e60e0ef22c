/**
 * The engine's unit checks (app/engine/unit-check.ts) run on the first minutes of a log, so the
 * Channel map step can propose a unit fix before the whole file is read. The same decimated traces
 * and thresholds as the summary's own checks (summary-finish.ts): only the stretch of log differs.
 */
import { ingestLog } from "../app/engine/ingest";
import type { SignCheck } from "../app/engine/sign-check";
import { TRACE_CHANNELS, TraceDecimator } from "../app/engine/summary-traces";
import type { ChannelMap, ChannelName } from "../app/engine/types";
import { damperRangeProblem, latAccelScaleProblem, sampleRateProblem, steerScaleProblem, traceSizes } from "../app/engine/unit-check";

const TRACE_OF: Partial<Record<(typeof TRACE_CHANNELS)[number], ChannelName>> = {
  speed_kmh: "speed", lat_accel_g: "lat_accel", long_accel_g: "long_accel", steer_deg: "steer",
  damper_fl_mm: "damper_fl", damper_fr_mm: "damper_fr", damper_rl_mm: "damper_rl", damper_rr_mm: "damper_rr",
  ride_height_front_mm: "ride_height_front", ride_height_rear_mm: "ride_height_rear", yaw_rate_deg_s: "yaw_rate",
};
const DAMPERS = ["damper_fl", "damper_fr", "damper_rl", "damper_rr"] as const;

/** Cuts `head` after its last line end. */
function wholeRows(head: Uint8Array): Uint8Array {
  let end = head.length;
  while (end > 0 && head[end - 1] !== 10) end--;
  return head.subarray(0, end);
}

/**
 * Unit proposals for a checked map on the first bytes of a log: the log's rate (time unit), damper
 * ranges, lateral acceleration against steering, and (with the car's steering ratio and wheelbase)
 * the steering's size. Each comes back as a `check_unit` verdict for the channel to look at.
 */
export async function checkUnitsOnHead(head: Uint8Array, map: ChannelMap, car?: { steering_ratio: number; wheelbase_mm: number }): Promise<SignCheck[]> {
  const bytes = wholeRows(head);
  const decimator = new TraceDecimator(TRACE_CHANNELS, 512);
  const cols: (Float64Array | null)[] = TRACE_CHANNELS.map(() => null);
  let rows = 0, tFirst = NaN, tLast = NaN;
  await ingestLog((async function* () { yield bytes; })(), map, {
    onBlock: (b) => {
      const t = b.channels.time!;
      if (rows === 0) tFirst = t[0];
      tLast = t[b.rows - 1];
      rows += b.rows;
      TRACE_CHANNELS.forEach((name, k) => {
        const ch = TRACE_OF[name];
        cols[k] = ch ? (b.channels[ch] ?? null) : null;
      });
      decimator.pushColumns(t, cols, b.rows);
    },
  });
  const out: SignCheck[] = [];
  const duration = tLast - tFirst;
  const rate = duration > 0 ? (rows - 1) / duration : NaN;
  const rateSlip = sampleRateProblem(rate, rows);
  if (rateSlip) out.push({ channel: "time", verdict: "check_unit", detail: rateSlip });
  if (rateSlip) return out; // every other size hangs on the time base
  const tr = decimator.state();
  const at = (name: (typeof TRACE_CHANNELS)[number]) => TRACE_CHANNELS.indexOf(name);
  const sizes = traceSizes(tr.buckets, TRACE_CHANNELS.length, tr.lo, tr.hi, {
    speed: at("speed_kmh"), lat: at("lat_accel_g"), steer: at("steer_deg"), dampers: DAMPERS.map((d) => at(`${d}_mm`)),
  }, car?.steering_ratio ?? NaN, (car?.wheelbase_mm ?? NaN) / 1000);
  // As in the summary: damper ranges only over a minute or more that spans 60 km/h of speed.
  if (sizes.speedSpanKmh >= 60 && duration >= 60) {
    DAMPERS.forEach((ch, i) => {
      const p = damperRangeProblem(ch, sizes.damperRangeMm[i]);
      if (p) out.push({ channel: ch, verdict: "check_unit", detail: p });
    });
  }
  const latSlip = latAccelScaleProblem(sizes);
  if (latSlip) out.push({ channel: "lat_accel", verdict: "check_unit", detail: latSlip });
  const steerSlip = latSlip || !car ? null : steerScaleProblem(sizes.steerRatio);
  if (steerSlip) out.push({ channel: "steer", verdict: "check_unit", detail: steerSlip });
  return out;
}

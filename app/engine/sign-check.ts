/**
 * Sign check on the first minutes of a log, for the mapping step: before a whole file is analysed,
 * does each channel read with the sign the engine expects, given the map as it stands?
 *
 * The tests (long_accel against dv/dt, each damper corner's pitch under braking with the aero held
 * apart, lat_accel, steer and yaw_rate against each other) and their thresholds are those of the
 * session summary: one accumulator and one verdict in sign-evidence.ts.
 *
 * Verdicts are relative to the map given: "invert" means flip that channel's `invert` flag.
 * A verdict is a proposal for the user to confirm, never applied silently.
 */
import { EngineError } from "./errors";
import { BlockSmoother } from "./filters";
import { ingestLog } from "./ingest";
import { addSignRows, createSignSums, evenWindowFlags, signVerdicts } from "./sign-evidence";
import type { SignCheck } from "./sign-evidence";
import { copyBlock, estimateDt } from "./summary-blocks";
import { resolveOptions } from "./summary-options";
import type { ChannelBlock, ChannelMap } from "./types";

export type { SignCheck } from "./sign-evidence";

const CHANNELS = ["speed", "long_accel", "lat_accel", "steer", "yaw_rate", "damper_fl", "damper_fr", "damper_rl", "damper_rr", "time"] as const;
const V = 0, AX = 1, AY = 2, STEER = 3, YAW = 4, D0 = 5, T = 9;

/** Cuts `head` after its last line end (a preview read from the start of a file ends mid-row). */
function wholeRows(head: Uint8Array): Uint8Array {
  let end = head.length;
  while (end > 0 && head[end - 1] !== 10) end--;
  return head.subarray(0, end);
}

/**
 * Checks the signs of the mapped channels on the first rows of a log (`head`: the file's first
 * bytes; a few megabytes, some minutes of running, are plenty). The channels are smoothed as the
 * summary smooths them (summary-options.ts defaults) and go through the summary's own accumulator
 * and verdict (sign-evidence.ts).
 */
export async function checkChannelSigns(head: Uint8Array, map: ChannelMap): Promise<SignCheck[]> {
  const blocks: ChannelBlock[] = [];
  const bytes = wholeRows(head);
  await ingestLog((async function* () { yield bytes; })(), map, { onBlock: (b) => blocks.push(copyBlock(b)) });
  const dt = estimateDt(blocks);
  if (dt === null) throw new EngineError("too_few_rows", "the start of the log has too few rows to check the channels' signs");
  const opts = resolveOptions({});
  const hDamper = Math.max(1, Math.round(opts.damperSmoothingS / dt / 2));
  const hGate = Math.max(1, Math.round(opts.gateSmoothingS / dt / 2));
  const halves = CHANNELS.map((_, i) => (i === V || i === AX || i >= D0 ? hDamper : hGate));
  const sm = new BlockSmoother(halves, dt, CHANNELS.map((_, i) => i === V));
  const sums = createSignSums();
  const cols: (Float64Array | null)[] = new Array(CHANNELS.length).fill(null);
  let even = new Uint8Array(0);
  const consume = (count: number) => {
    const m = sm.mean;
    if (even.length < count) even = new Uint8Array(count);
    evenWindowFlags(count, null, m[T], sm.centre[T], dt, even);
    addSignRows(sums, count, even, m[V], sm.slope[V], m[AX], m[AY], m[STEER], m[YAW], m[D0], m[D0 + 1], m[D0 + 2], m[D0 + 3]);
  };
  for (const b of blocks) {
    CHANNELS.forEach((c, k) => (cols[k] = b.channels[c] ?? null));
    consume(sm.push(cols, b.rows));
  }
  consume(sm.flush());
  return signVerdicts(sums, (c) => map[c] !== undefined, "at the start of the log");
}

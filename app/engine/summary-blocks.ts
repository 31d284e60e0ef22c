/** Helpers for the first blocks of a stream, before the sample rate is known. */
import type { ChannelBlock } from "./types";

export function copyBlock(b: ChannelBlock): ChannelBlock {
  const channels: ChannelBlock["channels"] = {};
  for (const [k, v] of Object.entries(b.channels)) channels[k as keyof typeof channels] = Float64Array.from(v!.subarray(0, b.rows));
  return { rows: b.rows, channels };
}

/** Median positive time step over the first rows; null until 16 steps are seen. */
export function estimateDt(blocks: ChannelBlock[]): number | null {
  const steps: number[] = [];
  let prev = NaN;
  for (const b of blocks) {
    const t = b.channels.time;
    if (!t) continue;
    for (let i = 0; i < b.rows && steps.length < 512; i++) {
      const d = t[i] - prev;
      if (d > 0) steps.push(d);
      if (t[i] === t[i]) prev = t[i];
    }
  }
  if (steps.length < 16) return null;
  steps.sort((a, b) => a - b);
  return steps[steps.length >> 1];
}

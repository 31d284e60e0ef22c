/**
 * Synthetic channel blocks built straight from textbook relations, for the engine's published checks:
 * damper travel from axle loads by the virtual-work relation ΔFw = Ks·MR·Δx (Barton & Fieldhouse,
 * Automotive Chassis Engineering, §3.9), steering from the steady-state relation
 * δ = 57.3·L/R + K·ay (Gillespie, Fundamentals of Vehicle Dynamics, ch. 6, from memory).
 */
import type { CarInput, ChannelBlock } from "~/engine/types";

export const G = 9.80665;
export const DEG = 180 / Math.PI;

export interface Trace {
  time: number[];
  speed: number[];
  ay: number[];
  ax: number[];
  steer: number[];
  /** Wheel-force change per axle from static (N), split evenly left/right. */
  loadFront: number[];
  loadRear: number[];
}

export function emptyTrace(): Trace {
  return { time: [], speed: [], ay: [], ax: [], steer: [], loadFront: [], loadRear: [] };
}

export function carFor(over: Partial<CarInput> = {}): CarInput {
  return {
    name: "Test car",
    wheelbase_mm: 2600,
    mass_kg: 1300,
    static_front_weight_pct: 55,
    cog_height_mm: 450,
    steering_ratio: 14,
    front: { spring_rate_n_per_mm: 120, motion_ratio: 0.9 },
    rear: { spring_rate_n_per_mm: 140, motion_ratio: 0.85 },
    static_damper_mm: { fl: 30, fr: 31, rl: 40, rr: 41 },
    ...over,
  };
}

/** Channel blocks of `blockRows` rows (the last one shorter), dampers from the axle loads. */
export function toBlocks(tr: Trace, car: CarInput, blockRows = 4096): ChannelBlock[] {
  const st = car.static_damper_mm ?? { fl: 30, fr: 31, rl: 40, rr: 41 };
  const kf = car.front.spring_rate_n_per_mm * car.front.motion_ratio;
  const kr = car.rear.spring_rate_n_per_mm * car.rear.motion_ratio;
  const n = tr.time.length;
  const blocks: ChannelBlock[] = [];
  for (let r0 = 0; r0 < n; r0 += blockRows) {
    const r1 = Math.min(n, r0 + blockRows);
    const f = (a: number[]) => Float64Array.from(a.slice(r0, r1));
    const lf = tr.loadFront.slice(r0, r1), lr = tr.loadRear.slice(r0, r1);
    blocks.push({
      rows: r1 - r0,
      channels: {
        time: f(tr.time), speed: f(tr.speed), lat_accel: f(tr.ay), long_accel: f(tr.ax), steer: f(tr.steer),
        damper_fl: Float64Array.from(lf, (x) => st.fl + x / 2 / kf),
        damper_fr: Float64Array.from(lf, (x) => st.fr + x / 2 / kf),
        damper_rl: Float64Array.from(lr, (x) => st.rl + x / 2 / kr),
        damper_rr: Float64Array.from(lr, (x) => st.rr + x / 2 / kr),
      },
    });
  }
  return blocks;
}

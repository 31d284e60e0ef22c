import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { isEngineError } from "~/engine/errors";
import { createSummaryBuilder } from "~/engine/summary";
import type { SessionSummary } from "~/engine/summary";
import type { ChannelBlock, ChannelName } from "~/engine/types";
import { carFor } from "./summary-synthetic";

// The summary's contract (engine issue): a figure that cannot be estimated is null with a warning
// saying why — never NaN or Infinity. Checked by property over logs that real loggers produce when
// something is off: a parked car, a constant speed, flat or frozen channels, pure noise, channels
// logged with the wrong sign, huge spikes, dropouts, and any mix of them.

const ROWS = 6000;
type Shape = "zero" | "constant" | "ramp" | "noise" | "sine" | "spikes" | "dropouts" | "negated";
const SHAPES: Shape[] = ["zero", "constant", "ramp", "noise", "sine", "spikes", "dropouts", "negated"];

/** A deterministic pseudo-random sequence (for the noise shapes; fast-check picks the seed). */
function lcg(seed: number): () => number {
  let s = seed >>> 0 || 1;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
}

function column(shape: Shape, scale: number, offset: number, seed: number, rows: number): Float64Array {
  const rnd = lcg(seed);
  return Float64Array.from({ length: rows }, (_, i) => {
    const base = offset + scale * Math.sin((2 * Math.PI * i) / 3000);
    switch (shape) {
      case "zero": return 0;
      case "constant": return offset;
      case "ramp": return offset + (scale * i) / rows;
      case "noise": return offset + scale * (rnd() - 0.5);
      case "sine": return base;
      case "spikes": return rnd() < 0.01 ? 1e6 * (rnd() - 0.5) : base;
      case "dropouts": return rnd() < 0.3 ? NaN : base;
      case "negated": return -base;
    }
  });
}

// Channel → [scale, offset] in engine units (m/s, m/s², deg, mm).
const CHANNELS: [ChannelName, number, number][] = [
  ["speed", 40, 30], ["lat_accel", 20, 0], ["long_accel", 10, 0], ["steer", 120, 0],
  ["damper_fl", 20, 30], ["damper_fr", 20, 30], ["damper_rl", 20, 40], ["damper_rr", 20, 40],
];

const logArb = fc.record({
  shapes: fc.array(fc.constantFrom(...SHAPES), { minLength: CHANNELS.length, maxLength: CHANNELS.length }),
  seed: fc.integer({ min: 1, max: 2 ** 31 - 1 }),
  hz: fc.constantFrom(10, 50, 100),
  rows: fc.integer({ min: 40, max: ROWS }),
  staticGiven: fc.boolean(),
  bumpStops: fc.boolean(),
});

function blocksOf(l: { shapes: Shape[]; seed: number; hz: number; rows: number }): ChannelBlock[] {
  const channels: ChannelBlock["channels"] = { time: Float64Array.from({ length: l.rows }, (_, i) => i / l.hz) };
  CHANNELS.forEach(([name, scale, offset], k) => {
    const c = column(l.shapes[k], scale, offset, l.seed + k, l.rows);
    // Speed is a magnitude: loggers never write it negative, and a parked car logs zero.
    channels[name] = name === "speed" ? c.map((v) => (Number.isNaN(v) ? v : Math.abs(v))) : c;
  });
  const out: ChannelBlock[] = [];
  for (let r0 = 0; r0 < l.rows; r0 += 1024) {
    const r1 = Math.min(l.rows, r0 + 1024);
    const part: ChannelBlock["channels"] = {};
    for (const [k, v] of Object.entries(channels)) part[k as ChannelName] = v!.slice(r0, r1);
    out.push({ rows: r1 - r0, channels: part });
  }
  return out;
}

function nonFinitePaths(v: unknown, path = "summary"): string[] {
  if (typeof v === "number") return Number.isFinite(v) ? [] : [path];
  if (Array.isArray(v)) return v.flatMap((x, i) => nonFinitePaths(x, `${path}[${i}]`));
  if (v && typeof v === "object") return Object.entries(v).flatMap(([k, x]) => nonFinitePaths(x, `${path}.${k}`));
  return [];
}

/** Codes that explain a null ClA / balance / CoP (session-wide). */
const AERO_CODES = ["few_aero_samples", "aero_fit_failed", "suspected_sign_error", "suspected_unit_error", "no_static_reference"];
/** Codes that explain a band's null understeer gradient. */
const UNDERSTEER_CODES = ["few_understeer_samples", "steering_offset_unknown", "suspected_sign_error", "suspected_unit_error"];
/** Codes written per band: their message starts with the band's label. */
const BAND_CODES = ["few_understeer_samples", "band_balance_low_load", "band_no_aero_samples", "one_turn_direction"];

describe("summary on broken and degenerate logs (property)", () => {
  it("never holds NaN or Infinity, and every null headline figure comes with a warning", () => {
    fc.assert(
      fc.property(logArb, (l) => {
        const car = carFor({
          ...(l.staticGiven ? {} : { static_damper_mm: undefined }),
          ...(l.bumpStops ? { front: { spring_rate_n_per_mm: 120, motion_ratio: 0.9, bump_stop: { gap_mm: 5, rate_n_per_mm: 300 } } } : {}),
        });
        const b = createSummaryBuilder(car);
        let s: SessionSummary;
        try {
          for (const blk of blocksOf(l)) b.push(blk);
          s = b.finish();
        } catch (e) {
          // A clear input error is an acceptable answer; a crash is not.
          expect(isEngineError(e)).toBe(true);
          expect((e as Error).message.length).toBeGreaterThan(10);
          return;
        }
        expect(nonFinitePaths(s)).toEqual([]);
        // Each null figure needs a warning whose code explains that figure (DEVELOPERS.md, summary
        // warnings), and a band's own warning names the band.
        const codes = (s2: SessionSummary) => new Set(s2.warnings.map((w) => w.code));
        const has = (allowed: string[], band?: { min_kmh: number; max_kmh: number }) =>
          s.warnings.some((w) => allowed.includes(w.code) && (!band || !BAND_CODES.includes(w.code) || w.message.startsWith(`${band.min_kmh}–${band.max_kmh} km/h`)));
        const headline = [s.aero.cla_front_m2, s.aero.cla_rear_m2, s.aero.balance_front_pct, s.cop.cop_behind_cog_mm];
        if (headline.some((x) => x === null)) expect(has(AERO_CODES), [...codes(s)].join(", ")).toBe(true);
        for (const band of s.bands) {
          if (band.samples === 0) continue;
          if (band.balance_front_pct === null) expect(has([...AERO_CODES, "band_balance_low_load", "band_no_aero_samples"], band), `${band.min_kmh}: ${[...codes(s)].join(", ")}`).toBe(true);
          if (band.understeer_gradient_deg_per_g === null) expect(has(UNDERSTEER_CODES, band), `${band.min_kmh}: ${[...codes(s)].join(", ")}`).toBe(true);
        }
        expect(s.bands).toHaveLength(5);
      }),
      { numRuns: 60, seed: 20261202 },
    );
  });
});

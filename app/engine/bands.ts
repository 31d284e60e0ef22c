/** Speed bands (km/h edges). Default 0, 80, 120, 160, 200, 300. */
import { KMH_PER_M_PER_S } from "./units";
import { EngineError } from "./errors";

export const DEFAULT_BAND_EDGES_KMH = [0, 80, 120, 160, 200, 300] as const;
export const MAX_BANDS = 20;

/**
 * A band's balance is given when its mean aero load is at least this share of the car's weight
 * (below it, a few newtons of static-load error swing the split by points).
 */
export const BAND_BALANCE_MIN_LOAD_SHARE = 0.05;
/**
 * The balance shift is taken between the lowest and the highest band whose balance is given and that
 * holds at least this much aero running (s): a band crossed only briefly says little.
 */
export const BALANCE_SHIFT_MIN_AERO_S = 20;
/** The balance shift's rule in words (summary field `balance_shift.rule`, methods note). */
export const BALANCE_SHIFT_RULE = `from the lowest to the highest speed band whose balance is given (aero load at least ${BAND_BALANCE_MIN_LOAD_SHARE * 100} % of the car's weight) and that holds at least ${BALANCE_SHIFT_MIN_AERO_S} s of aero running`;

/** Validate band edges: at least two, finite, ≥ 0, strictly increasing, at most 21 edges. */
export function validateBandEdges(edges: readonly number[]): number[] {
  if (!Array.isArray(edges) || edges.length < 2) throw new EngineError("bad_options", "speed bands need at least two edges, e.g. 0,80,120");
  if (edges.length > MAX_BANDS + 1) throw new EngineError("bad_options", `at most ${MAX_BANDS} speed bands (${edges.length - 1} given)`);
  edges.forEach((e, i) => {
    if (typeof e !== "number" || !Number.isFinite(e) || e < 0 || e > 1000) throw new EngineError("bad_options", `speed band edge ${i + 1} must be a number of km/h from 0 to 1000, got ${String(e)}`);
    if (i > 0 && !(e > edges[i - 1])) throw new EngineError("bad_options", `speed band edges must increase: ${edges[i - 1]} then ${e}`);
  });
  return [...edges];
}

/** Parse "0,80,120,160,260" from the command line. */
export function parseBandEdges(text: string): number[] {
  const parts = text.split(",").map((s) => s.trim());
  const edges = parts.map((p) => {
    if (!/^\d+(\.\d+)?$/.test(p)) throw new EngineError("bad_options", `--bands must be comma-separated km/h, got "${p}" in "${text}"`);
    return Number(p);
  });
  return validateBandEdges(edges);
}

/** Upper edges in m/s for the hot loop: band i holds edge[i] ≤ v < edge[i+1]. */
export function bandEdgesMs(edgesKmh: readonly number[]): Float64Array {
  return Float64Array.from(edgesKmh, (e) => e / KMH_PER_M_PER_S);
}

/** Band index of a speed (m/s), −1 outside the edges. */
export function bandIndex(edgesMs: Float64Array, speedMs: number): number {
  if (!(speedMs >= edgesMs[0])) return -1;
  const last = edgesMs.length - 1;
  for (let i = 1; i <= last; i++) if (speedMs < edgesMs[i]) return i - 1;
  return -1;
}

/**
 * Stage 4 of the summary: speed bands. Per band, the mean measured axle load less the chosen aero
 * model's static load and drift, pooled with the model's prediction (band-pool.ts), its ClA, balance
 * and CoP with intervals from the band's block means and the model,
 * and the ride-height change from the dampers; then the balance shift between bands and the aero map
 * against front ride height.
 */
import { bandAeroLoadN, offsetVariance, RH_MAP_BIN_MM, RH_MAP_BINS, RH_MAP_LO_MM } from "./aero";
import { poolBands } from "./band-pool";
import type { AeroFit } from "./aero";
import { BALANCE_SHIFT_MIN_AERO_S, BALANCE_SHIFT_RULE, BAND_BALANCE_MIN_LOAD_SHARE } from "./bands";
import { balanceFrontPct, cogFromFrontAxleMm, copFromFrontAxleMm, rideHeightChangeMm, wheelForceChangeN } from "./physics";
import { interval95, roundOrNull as r, roundPair } from "./stats";
import type { AeroStage } from "./summary-aero";
import type { Warn } from "./summary-checks";
import type { StaticReference, SummaryState } from "./summary-state";
import type { BandSummary, SessionSummary } from "./summary-types";
import { KMH_PER_M_PER_S, STANDARD_GRAVITY_M_PER_S2 } from "./units";

/** Blocks (time blocks holding enough of a band's aero samples) before a band's balance gets an interval. */
const MIN_BAND_BLOCKS = 5;

/** A band's aero and ride-height figures (the part of BandSummary this stage gives). */
export type BandAero = Omit<BandSummary, "understeer_gradient_deg_per_g" | "understeer_ci95_deg_per_g" | "understeer_samples" | "understeer_blocks" | "understeer_lat_g_range" | "steady_cornering_s">;

interface BandBalance { bal: number; ci: [number, number] | null; aeroS: number }

export interface BandStage {
  bands: BandAero[];
  balanceShift: SessionSummary["aero"]["balance_shift"];
}

export function bandStage(s: SummaryState, aero: AeroStage, warn: Warn): BandStage {
  const { fit } = aero;
  const c = s.model;
  const a = s.aero.bands;
  const edges = s.opts.bandEdgesKmh;
  const weightN = c.massKg * STANDARD_GRAVITY_M_PER_S2;
  const rate = Number.isFinite(s.sampleRateHz) && s.sampleRateHz > 0 ? s.sampleRateHz : 1;
  const cogMm = cogFromFrontAxleMm(s.car.wheelbase_mm, s.car.static_front_weight_pct);
  const bands: BandAero[] = [];
  const balances: BandBalance[] = [];
  // The band means as measured (less static load and drift) and their block spread, then pooled
  // with the chosen model (band-pool.ts) when it is one ClA or ClA linear in ride height.
  const raw = Array.from({ length: s.bandCount }, (_, b) => {
    const n = a.n[b];
    if (!fit || !(n > 0)) return null;
    const spread = s.aero.bandBlockSpread(b, fit.front.drift_n_per_s, fit.rear.drift_n_per_s);
    return {
      spread,
      front: { load: bandAeroLoadN(n, a.st[b], a.sf[b], fit.front), variance: spread.varF / spread.blocks, blocks: spread.blocks },
      rear: { load: bandAeroLoadN(n, a.st[b], a.sr[b], fit.rear), variance: spread.varR / spread.blocks, blocks: spread.blocks },
    };
  });
  const model = aero.variation && aero.variation.chosen !== "speed_band" ? aero.variation.models[aero.variation.chosen] : undefined;
  const pooled = poolBands(model, a, raw.map((x) => x && { front: x.front, rear: x.rear, cov: x.spread.cov / x.spread.blocks }));
  for (let b = 0; b < s.bandCount; b++) {
    const label = `${edges[b]}–${edges[b + 1]} km/h`;
    const n = a.n[b];
    const pair = pooled[b], pf = pair?.front ?? null, pr = pair?.rear ?? null, spread = raw[b]?.spread ?? null;
    const loadF = pf ? pf.load : NaN;
    const loadR = pr ? pr.load : NaN;
    const qMean = n > 0 ? a.sq[b] / n : NaN;
    let bal = NaN;
    if (fit && n === 0 && s.bandRows[b] > 0) warn("band_no_aero_samples", `${label}: none of the ${s.bandRows[b]} samples passed the aero gates (|ax| ≤ ${s.opts.gates.aero_max_long_g} g, steady dampers, above ${s.opts.gates.aero_min_speed_kmh} km/h)`);
    if (fit && n > 0) {
      if (loadF + loadR > BAND_BALANCE_MIN_LOAD_SHARE * weightN) bal = balanceFrontPct(loadF, loadR);
      else if (s.bandRows[b] > 0) warn("band_balance_low_load", `${label}: aero load (${(loadF + loadR).toFixed(0)} N) is under ${BAND_BALANCE_MIN_LOAD_SHARE * 100} % of the car's weight, too small to split between the axles`);
    }
    const bandCop = Number.isFinite(bal) ? copFromFrontAxleMm(s.car.wheelbase_mm, bal) : NaN;
    // Intervals: the pooled loads' variance (the band's block means and the model's prediction),
    // plus the fitted static load's uncertainty at the band's mean time (delta method on F/(F + R)
    // for the balance).
    let balCi: [number, number] | null = null, claFCi: [number, number] | null = null, claRCi: [number, number] | null = null;
    if (spread && fit && pf && pr && n > 0 && spread.blocks >= MIN_BAND_BLOCKS) {
      const tau = a.st[b] / n;
      const vF = pf.variance + offsetVariance(fit.front, tau), vR = pr.variance + offsetVariance(fit.rear, tau);
      claFCi = interval95(loadF / qMean, Math.sqrt(vF) / qMean, spread.blocks - 1);
      claRCi = interval95(loadR / qMean, Math.sqrt(vR) / qMean, spread.blocks - 1);
      if (Number.isFinite(bal)) {
        const total = loadF + loadR;
        const gF = (100 * loadR) / (total * total), gR = (-100 * loadF) / (total * total);
        const v = gF * gF * vF + gR * gR * vR + 2 * gF * gR * pair!.cov;
        balCi = interval95(bal, Math.sqrt(Math.max(0, v)), spread.blocks - 1);
      }
    }
    bands.push({
      min_kmh: edges[b],
      max_kmh: edges[b + 1],
      samples: s.bandRows[b],
      aero_samples: n,
      mean_dynamic_pressure_pa: r(qMean, 1),
      aero_load_front_n: r(loadF, 1),
      aero_load_rear_n: r(loadR, 1),
      balance_front_pct: r(bal, 2),
      balance_front_ci95_pct: roundPair(balCi, 2),
      aero_blocks: spread ? spread.blocks : 0,
      cla_front_m2: r(loadF / qMean, 4),
      cla_rear_m2: r(loadR / qMean, 4),
      ...rideHeights(s, aero.staticRef, b),
      duration_s: r(s.bandRows[b] / rate, 2) ?? 0,
      mean_speed_kmh: r(s.bandRows[b] > 0 ? (s.bandSpeedSum[b] / s.bandRows[b]) * KMH_PER_M_PER_S : NaN, 2),
      cla_front_ci95_m2: roundPair(claFCi, 4),
      cla_rear_ci95_m2: roundPair(claRCi, 4),
      cop_from_front_axle_mm: r(bandCop, 1),
      cop_behind_cog_mm: r(bandCop - cogMm, 1),
    });
    balances.push({ bal, ci: balCi, aeroS: n / rate });
  }
  return { bands, balanceShift: balanceShift(bands, balances, s.car.wheelbase_mm) };
}

/**
 * Balance shift by BALANCE_SHIFT_RULE (bands.ts): from the lowest to the highest band whose balance
 * is given and that holds enough aero running; the two bands' balance intervals taken as independent
 * for the interval of the difference.
 */
function balanceShift(bands: BandAero[], bb: BandBalance[], wheelbaseMm: number): SessionSummary["aero"]["balance_shift"] {
  const ok = bb.map((x, i) => (Number.isFinite(x.bal) && x.aeroS >= BALANCE_SHIFT_MIN_AERO_S ? i : -1)).filter((i) => i >= 0);
  if (ok.length < 2) return null;
  const lo = ok[0], hi = ok[ok.length - 1];
  const points = bb[hi].bal - bb[lo].bal;
  const half = (ci: [number, number] | null) => (ci ? (ci[1] - ci[0]) / 2 : NaN);
  const h = Math.hypot(half(bb[lo].ci), half(bb[hi].ci));
  const ci: [number, number] | null = Number.isFinite(h) ? [points - h, points + h] : null;
  // CoP = L·(1 − balance): a forward shift of balance by p points moves the CoP forward by L·p/100.
  const mm = (wheelbaseMm * points) / 100;
  return {
    rule: BALANCE_SHIFT_RULE,
    low_band_kmh: [bands[lo].min_kmh, bands[lo].max_kmh],
    high_band_kmh: [bands[hi].min_kmh, bands[hi].max_kmh],
    points: r(points, 2)!,
    ci95_points: roundPair(ci, 2),
    cop_shift_mm: r(mm, 1)!,
    cop_shift_ci95_mm: ci ? roundPair([(wheelbaseMm * ci[0]) / 100, (wheelbaseMm * ci[1]) / 100], 1) : null,
  };
}

function rideHeights(s: SummaryState, st: StaticReference | null, b: number) {
  const a = s.aero.bands;
  const n = a.n[b];
  const c = s.model;
  const staticF = st ? (st.fl + st.fr) / 2 : NaN;
  const staticR = st ? (st.rl + st.rr) / 2 : NaN;
  const kt = s.opts.tyreRateNPerMm;
  // Suspension travel at the wheel (damper travel / MR) plus the tyre's deflection under the same
  // spring force change (Ks·MR per mm of damper travel, per wheel): the springs and tyre in series.
  const dF = n > 0 ? a.dampFront[b] / n / 2 - staticF : NaN, dR = n > 0 ? a.dampRear[b] / n / 2 - staticR : NaN;
  const ks = (axle: "front" | "rear") => s.car[axle].spring_rate_n_per_mm;
  const changeF = rideHeightChangeMm(dF, c.motionRatioFront, wheelForceChangeN(dF, ks("front"), c.motionRatioFront), kt);
  const changeR = rideHeightChangeMm(dR, c.motionRatioRear, wheelForceChangeN(dR, ks("rear"), c.motionRatioRear), kt);
  const rhF = a.rhFrontN[b] > 0 ? a.rhFront[b] / a.rhFrontN[b] : NaN;
  const rhR = a.rhRearN[b] > 0 ? a.rhRear[b] / a.rhRearN[b] : NaN;
  return {
    ride_height_change_front_mm: r(changeF, 2),
    ride_height_change_rear_mm: r(changeR, 2),
    rake_change_mm: r(changeR - changeF, 2),
    ride_height_front_mm: r(rhF, 2),
    ride_height_rear_mm: r(rhR, 2),
    rake_mm: r(rhR - rhF, 2),
  };
}

/**
 * Aero map against the front ride-height change: bins with at least 2 s of samples; balance only
 * where the aero load is ≥ 5 % of the weight. `edgeShiftMm`: the samples were binned against the
 * streaming static reference; once that is corrected (static-estimate.ts) every sample's ride-height
 * change moves by the same amount, and so do the bin edges.
 */
export function rideHeightMap(s: SummaryState, fit: AeroFit | null, edgeShiftMm: number): SessionSummary["aero_map_front_ride_height"] {
  const out: SessionSummary["aero_map_front_ride_height"] = [];
  if (!fit) return out;
  const weightN = s.model.massKg * STANDARD_GRAVITY_M_PER_S2;
  const m = s.aero.rhMap;
  const minSamples = 2 * (Number.isFinite(s.sampleRateHz) ? s.sampleRateHz : 50);
  for (let bin = 0; bin < RH_MAP_BINS; bin++) {
    const o = bin * 5, n = m[o];
    if (n < minSamples) continue;
    const f = bandAeroLoadN(n, m[o + 1], m[o + 3], fit.front);
    const rr = bandAeroLoadN(n, m[o + 1], m[o + 4], fit.rear);
    out.push({
      ride_height_change_front_min_mm: r(RH_MAP_LO_MM + bin * RH_MAP_BIN_MM + edgeShiftMm, 2)!,
      ride_height_change_front_max_mm: r(RH_MAP_LO_MM + (bin + 1) * RH_MAP_BIN_MM + edgeShiftMm, 2)!,
      samples: n,
      mean_dynamic_pressure_pa: r(m[o + 2] / n, 1)!,
      aero_load_front_n: r(f, 1),
      aero_load_rear_n: r(rr, 1),
      balance_front_pct: f + rr > BAND_BALANCE_MIN_LOAD_SHARE * weightN ? r(balanceFrontPct(f, rr), 2) : null,
    });
  }
  return out;
}

/**
 * Stage 3 of the summary: the aero fit. Axle loads against dynamic pressure with the static load and
 * its drift (a given fuel burn, or a fitted trend), which aero model the figures rest on
 * (aero-model.ts, chosen by BIC), the headline ClA and balance, the static reference and bump-stop
 * contact, and the sensitivity of balance and ClA to the front ride height.
 */
import { fitAero } from "./aero";
import type { AeroFit, AxleFit } from "./aero";
import { fitModel } from "./aero-model";
import type { AeroVariation, ModelFit } from "./aero-model";
import { BAND_BLOCK_STRIDE } from "./aero";
import { fuelAxleLoadChangeN } from "./fuel";
import { balanceFrontPct } from "./physics";
import { aeroTravelAtEstimateMm, CONTACT_SLOTS, contactSharePct } from "./static-estimate";
import { interval95, roundOrNull as r, roundPair } from "./stats";
import type { ChannelChecks, Warn } from "./summary-checks";
import { staticReference } from "./summary-state";
import type { StaticReference, SummaryState } from "./summary-state";
import type { RideHeightSensitivity } from "./summary-types";

const MIN_AERO_BLOCKS = 10;
const FEW_AERO_BLOCKS = 60;
const DRIFT_MIN_DURATION_S = 120;
const CONTACT_WARN_PCT = 2;

/** Blocks a speed band needs for a ClA of its own (fewer: it shares its neighbour's). */
const MIN_BLOCKS_PER_BAND_CLA = 20;
/** Front ride-height span (mm of block means) before a sensitivity per mm is given. */
const MIN_RIDE_HEIGHT_SPAN_MM = 3;

/**
 * How much lower a model with more parameters must score to be chosen: a BIC difference over 6 is
 * "strong" evidence (Kass & Raftery, JASA 90, 1995, from memory). Below it the simpler model stands:
 * an extra ride-height term that barely earns its place loosens the static load (fitted beside it
 * when the car file gives no static readings) and moves every band with it.
 */
const STRONG_EVIDENCE_BIC = 6;

export const CRITERION_NAME = "BIC on 1 s block means of both axles' loads (lower is better; Schwarz 1978); a model with more parameters must be lower by more than 6 (strong evidence, Kass & Raftery 1995)";

export interface AeroVariationChoice {
  chosen: AeroVariation;
  criterion: string;
  scores: Record<AeroVariation, number | null>;
  models: Partial<Record<AeroVariation, ModelFit>>;
}

/**
 * Fits the three models, keeps the one with the lowest criterion (the simpler one on a tie or when
 * the others cannot be scored), and puts its static load and drift into `fit` (and the headline ClA:
 * the q²-weighted mean of the aero load over q, Σq·(F − a − b·τ)/Σq²).
 */
export function chooseAeroModel(
  s: SummaryState, fit: AeroFit,
  spec: { withIntercept: boolean; withDrift: boolean; knownDrift: { front: number; rear: number } | null },
): AeroVariationChoice {
  const m = s.aero.moments;
  const bandBlocks = Array.from({ length: s.bandCount }, (_, b) => s.aero.bandBlocks[b * BAND_BLOCK_STRIDE]);
  const full = { ...spec, bandBlocks, minBandBlocks: MIN_BLOCKS_PER_BAND_CLA };
  const models: Partial<Record<AeroVariation, ModelFit>> = {};
  const scores: Record<AeroVariation, number | null> = { constant: null, speed_band: null, ride_height: null, ride_height_front_rear: null };
  // Both axles' ride heights only beside a known static load: with the static load fitted too, a
  // second ride-height term can trade the static load against the aero's shape in q (both reach
  // q = 0 only by extrapolation), and every band moves with it.
  const offered = spec.withIntercept ? (["constant", "speed_band", "ride_height"] as const) : (["constant", "speed_band", "ride_height", "ride_height_front_rear"] as const);
  for (const v of offered) {
    const f = fitModel(m, v, full);
    if (!f) continue;
    models[v] = f;
    scores[v] = r(f.bic ?? NaN, 1);
  }
  // From the fewest parameters up: a larger model replaces the one chosen so far only when its
  // criterion is lower by more than STRONG_EVIDENCE_BIC; one with as many or fewer, when lower at all.
  let chosen: AeroVariation = "constant";
  const order = (["constant", "ride_height", "speed_band", "ride_height_front_rear"] as const)
    .filter((v) => models[v]).sort((x, y) => models[x]!.parameters - models[y]!.parameters);
  for (const v of order) {
    const sc = models[v]!.bic, cur = models[chosen];
    if (sc === null) continue;
    if (!cur || cur.bic === null) { chosen = v; continue; }
    const margin = models[v]!.parameters > cur.parameters ? STRONG_EVIDENCE_BIC : 0;
    if (sc < cur.bic - margin) chosen = v;
  }
  const model = models[chosen];
  if (chosen !== "constant" && model) {
    const sums = s.aero.samples;
    for (const side of ["front", "rear"] as const) {
      const ax: AxleFit = fit[side], mx = model[side];
      const sqy = side === "front" ? sums.sqf : sums.sqr;
      const cla = (sqy - mx.intercept_n * sums.sq - mx.drift_n_per_s * sums.stq) / sums.sqq;
      const shift = cla - ax.cla_m2;
      ax.cla_m2 = cla;
      if (ax.cla_ci95_m2) ax.cla_ci95_m2 = [ax.cla_ci95_m2[0] + shift, ax.cla_ci95_m2[1] + shift];
      ax.intercept_n = mx.intercept_n;
      ax.drift_n_per_s = mx.drift_n_per_s;
      ax.offset_cov = mx.offset_cov;
    }
  }
  return { chosen, criterion: CRITERION_NAME, scores, models };
}

/**
 * Balance and total ClA per mm of front ride-height change, from the ride-height model's slopes
 * (c1 per axle) at the headline ClA: d(balance)/dh = 100·(c1_f·ClA_r − ClA_f·c1_r)/ClA_total².
 * Null when the model could not be fitted or the data span less than 3 mm of front ride height.
 */
export function rideHeightSensitivity(s: SummaryState, choice: AeroVariationChoice, fit: AeroFit): RideHeightSensitivity | null {
  // The front ride height's slope: from the front-and-rear model when the criterion chose it (the
  // rear's own sensitivity then stays out of c1), else from the front-only model.
  const both = choice.chosen === "ride_height_front_rear";
  const model = both ? choice.models.ride_height_front_rear : choice.models.ride_height;
  const m = s.aero.moments;
  if (!model || !(m.hMax - m.hMin >= MIN_RIDE_HEIGHT_SPAN_MM)) return null; // suspension travel, tyre left out: the stricter reading
  const cf = fit.front.cla_m2, cr = fit.rear.cla_m2, ct = cf + cr;
  if (!(ct > 0)) return null;
  // The dampers see the suspension's share of the ride-height change; the tyre (in series) adds
  // Kw/Kt of it again: ride height = suspension travel·(1 + Kw/Kt).
  const c = s.model;
  const tyre = 1 + (c.forcePerMmFront * c.motionRatioFront) / s.opts.tyreRateNPerMm;
  const c1f = model.front.beta[1] / tyre, c1r = model.rear.beta[1] / tyre;
  const c1 = both ? 4 : 3; // c1's variance in the aero coefficients' covariance (3 × 3 or 2 × 2, row-major)
  const vf = model.front.cov[c1] / (tyre * tyre), vr = model.rear.cov[c1] / (tyre * tyre);
  const df = Math.max(1, m.blockCount - model.parameters / 2);
  const bal = (100 * (c1f * cr - cf * c1r)) / (ct * ct);
  const balSe = (100 * Math.sqrt(cr * cr * vf + cf * cf * vr)) / (ct * ct);
  const tot = c1f + c1r, totSe = Math.sqrt(vf + vr);
  return {
    front_ride_height_span_mm: [r(m.hMin * tyre, 2)!, r(m.hMax * tyre, 2)!],
    balance_pct_per_mm: r(bal, 4)!,
    balance_ci95_pct_per_mm: roundPair(interval95(bal, balSe, df), 4),
    cla_total_m2_per_mm: r(tot, 5)!,
    cla_total_ci95_m2_per_mm: roundPair(interval95(tot, totSe, df), 5),
  };
}

export interface AeroStage {
  fit: AeroFit | null;
  alt: AeroFit | null;
  variation: AeroVariationChoice | null;
  withIntercept: boolean;
  withDrift: boolean;
  fuelChange: { front: number; rear: number } | null;
  claF: number; claR: number; claT: number;
  balance: number;
  balanceCi: [number, number] | null;
  /** Damper travel the slow running's aero load accounts for in an estimated static reference (mm per axle). */
  aeroShift: { front: number; rear: number };
  staticRef: StaticReference | null;
  contactPct: { front: number; rear: number };
}

export function aeroStage(s: SummaryState, checks: ChannelChecks, duration: number, warn: Warn): AeroStage {
  const c = s.model;
  // Through the origin when static readings are given, else with an intercept.
  const withIntercept = !s.staticGiven;
  // Static-load drift: a given fuel burn (known, not fitted), else a fitted linear trend on long stints.
  const fuelGiven = s.opts.fuel;
  const tankM = c.fuelTankFromFrontAxleM ?? c.wheelbaseM * (1 - c.frontWeightFraction);
  const fuelChange = fuelGiven ? fuelAxleLoadChangeN(fuelGiven.endKg - fuelGiven.startKg, tankM, c.wheelbaseM) : null;
  const knownDrift = fuelChange && duration > 0 ? { front: fuelChange.front / duration, rear: fuelChange.rear / duration } : fuelChange ? { front: 0, rear: 0 } : null;
  if (fuelGiven && c.fuelTankFromFrontAxleM === null) warn("fuel_tank_position_assumed", `the car file gives no fuel_tank_from_front_axle_mm: the fuel burn is split over the axles as the static weight is (tank taken at the centre of gravity, ${(tankM * 1000).toFixed(0)} mm behind the front axle)`);
  const withDrift = !fuelGiven && duration >= DRIFT_MIN_DURATION_S && s.aero.blocks.n >= FEW_AERO_BLOCKS;
  if (!fuelGiven) warn("fuel_not_given", withDrift ? "fuel at the start and end of the stint not given: the static-load change (fuel burn, pot drift) is fitted as a linear trend, which can take up part of the aero's speed dependence; give the fuel (--fuel-start-kg, --fuel-end-kg) for firmer band balances" : "fuel at the start and end of the stint not given and the log is too short to fit a static-load trend: a fuel burn during the log is not modelled");

  let fit: AeroFit | null = null;
  let alt: AeroFit | null = null;
  if (checks.aeroBlocked) {
    // No fit: the check's warning says why.
  } else if (s.aero.blocks.n >= MIN_AERO_BLOCKS) {
    fit = fitAero(s.aero, withIntercept, withDrift, knownDrift);
    alt = fitAero(s.aero, !withIntercept, withDrift, knownDrift);
    if (!fit) warn("aero_fit_failed", "the aero fit could not be solved: the usable samples do not span enough speeds");
  } else {
    warn("few_aero_samples", `only ${s.aero.blocks.n} s of usable running for the aero fit (at least ${MIN_AERO_BLOCKS} s above ${s.opts.gates.aero_min_speed_kmh} km/h with |ax| ≤ ${s.opts.gates.aero_max_long_g} g are needed), so ClA and balance are not estimated`);
  }
  // The chosen model's static load and drift then stand for all figures (bands are measured loads less those).
  const variation = fit ? chooseAeroModel(s, fit, { withIntercept, withDrift, knownDrift }) : null;
  if (fit && s.aero.blocks.n < FEW_AERO_BLOCKS) warn("few_aero_samples", `the aero fit rests on only ${s.aero.blocks.n} s of running: treat ClA and balance as rough`);
  if (s.aeroWaitingStatic > 0) warn("static_estimated", `${s.aeroWaitingStatic} samples waited for a static damper estimate before the bump-stop model could place contact; give static_damper_mm in the car file to use them`);
  if (!s.staticGiven && s.hasBumpStops && s.estN < s.estMin) warn("no_static_reference", "no static damper readings and no slow running to estimate them: the bump-stop contact cannot be placed, so no aero samples were used");

  const claF = fit ? fit.front.cla_m2 : NaN;
  const claR = fit ? fit.rear.cla_m2 : NaN;
  const claT = claF + claR;
  let balance = NaN;
  if (fit) {
    if (!(claT > 0)) warn("suspected_sign_error", `total ClA came out ${claT.toFixed(3)} m² (not positive): check the damper channels' sign (compression must be positive) and the motion ratios`);
    else balance = balanceFrontPct(claF, claR);
    if (claT > 0 && (claF < -0.05 || claR < -0.05)) warn("suspected_sign_error", `ClA ${claF < -0.05 ? "front" : "rear"} is negative (${(claF < -0.05 ? claF : claR).toFixed(3)} m²): an inverted damper channel or a wrong spring rate is more likely than real lift`);
  }
  let balanceCi: [number, number] | null = null;
  if (fit && claT > 0 && Number.isFinite(fit.front.cla_se_m2) && Number.isFinite(fit.rear.cla_se_m2)) {
    const dF = claR / (claT * claT), dR = -claF / (claT * claT);
    const se = 100 * Math.sqrt(dF * dF * fit.front.cla_se_m2 ** 2 + dR * dR * fit.rear.cla_se_m2 ** 2);
    balanceCi = [balance - 1.96 * se, balance + 1.96 * se];
  }
  // A static reference learned from slow running reads compressed by that running's aero load: taken out with the fit's ClA.
  const aeroShift = s.staticGiven ? { front: 0, rear: 0 } : aeroTravelAtEstimateMm(s.est, s.estN, claF, claR, c.forcePerMmFront, c.forcePerMmRear);
  const contactPct = {
    front: c.bumpForcePerMmFront > 0 ? contactSharePct(s.contactHist, 0, aeroShift.front) : NaN,
    rear: c.bumpForcePerMmRear > 0 ? contactSharePct(s.contactHist, CONTACT_SLOTS, aeroShift.rear) : NaN,
  };
  for (const axle of ["front", "rear"] as const) {
    const pct = contactPct[axle];
    if (pct > CONTACT_WARN_PCT) warn("bump_stop_contact", `${axle} bump stops are in contact in ${pct.toFixed(1)} % of the running above ${s.opts.gates.aero_min_speed_kmh} km/h: the result leans on the bump-stop rate and gap in the car file`);
  }
  if (fit && withDrift) {
    for (const side of ["front", "rear"] as const) {
      const a = fit[side];
      const change = a.drift_n_per_s * duration;
      if (Math.abs(change) >= 25 && Math.abs(a.drift_n_per_s) > 3 * (a.drift_se_n_per_s || Infinity)) {
        warn("static_load_drift", `the ${side} static load changed by ${change.toFixed(0)} N over the stint (fuel burn, or damper pot drift); it is modelled as a linear trend in the fit`);
      }
    }
  }
  return { fit, alt, variation, withIntercept, withDrift, fuelChange, claF, claR, claT, balance, balanceCi, aeroShift, staticRef: staticReference(s, aeroShift), contactPct };
}

/** Turns the streaming statistics into the SessionSummary (fits, bands, warnings). */
import { KMH_PER_M_PER_S, STANDARD_GRAVITY_M_PER_S2 } from "./units";
import { bandAeroLoadN, fitAero, offsetVariance, RH_MAP_BIN_MM, RH_MAP_BINS, RH_MAP_LO_MM } from "./aero";
import type { AeroFit } from "./aero";
import { fuelAxleLoadChangeN } from "./fuel";
import { BALANCE_SHIFT_MIN_AERO_S, BALANCE_SHIFT_RULE, BAND_BALANCE_MIN_LOAD_SHARE } from "./bands";
import { chooseAeroModel, rideHeightSensitivity } from "./summary-aero";
import { balanceFrontPct, cogFromFrontAxleMm, copFromFrontAxleMm } from "./physics";
import type { StaticReference, SummaryBuilder } from "./summary";
import { CAUTIONS, METHOD_NOTES, RIDE_HEIGHT_NOTE, SUMMARY_VERSION } from "./summary-types";
import type { BandSummary, FinishContext, SessionSummary, SummaryWarning } from "./summary-types";
import { interval95, roundOrNull as r, roundPair } from "./stats";
import { aeroTravelAtEstimateMm, CONTACT_SLOTS, contactSharePct } from "./static-estimate";
import { damperRangeProblem, latAccelScaleProblem, longAccelScaleProblem, sampleRateProblem, steerScaleProblem, traceSizes } from "./unit-check";
import { TRACE_CHANNELS } from "./summary-traces";
import { bandUndersteer, estimateSteeringOffset } from "./understeer";

const MIN_AERO_BLOCKS = 10;
const FEW_AERO_BLOCKS = 60;
/** Straight-line blocks before the steering offset comes from the straights. */
const MIN_OFFSET_BLOCKS = 5;
/** Seconds of steady cornering in a band before it gets an understeer gradient, and before it is not called rough. */
const MIN_US_SECONDS = 5;
const FEW_US_SECONDS = 15;
const DRIFT_MIN_DURATION_S = 120;
const LARGE_OFFSET_DEG = 3;
/** Blocks (time blocks holding enough of a band's aero samples) before a band's balance gets an interval. */
const MIN_BAND_BLOCKS = 5;
/** Samples (speed changing by ≥ 0.05 g above 30 km/h) before the sign checks against dv/dt speak. */
const MIN_SIGN_SAMPLES = 200;
const CONTACT_WARN_PCT = 2;
/** Short rows named by their time in the warning. */
const SHORT_ROWS_NAMED = 5;

export function buildSummary(s: SummaryBuilder, ctx: FinishContext): SessionSummary {
  const warnings: SummaryWarning[] = [];
  const warn = (code: string, message: string) => warnings.push({ code, message });
  const flags: string[] = [];
  const c = s.model;
  const duration = s.rows > 1 ? s.tLast - s.t0 : 0;
  if (s.air.source !== "given") warn("air_density_assumed", `air density ${s.air.density_kg_m3.toFixed(4)} kg/m³ uses ${s.air.source === "partly_given" ? "ISA sea level for the value not given" : "ISA sea level (15 °C, 1013.25 hPa)"}; give --air-temp-c and --air-pressure-hpa for the session's weather`);

  // Aero fit: through the origin when static readings are given, else with an intercept.
  const withIntercept = !s.staticGiven;
  // Static-load drift: a given fuel burn (known, not fitted), else a fitted linear trend on long stints.
  const fuelGiven = s.opts.fuel;
  const tankM = c.fuelTankFromFrontAxleM ?? c.wheelbaseM * (1 - c.frontWeightFraction);
  const fuelChange = fuelGiven ? fuelAxleLoadChangeN(fuelGiven.endKg - fuelGiven.startKg, tankM, c.wheelbaseM) : null;
  const knownDrift = fuelChange && duration > 0 ? { front: fuelChange.front / duration, rear: fuelChange.rear / duration } : fuelChange ? { front: 0, rear: 0 } : null;
  if (fuelGiven && c.fuelTankFromFrontAxleM === null) warn("fuel_tank_position_assumed", `the car file gives no fuel_tank_from_front_axle_mm: the fuel burn is split over the axles as the static weight is (tank taken at the centre of gravity, ${(tankM * 1000).toFixed(0)} mm behind the front axle)`);
  const withDrift = !fuelGiven && duration >= DRIFT_MIN_DURATION_S && s.aero.blocks.n >= FEW_AERO_BLOCKS;
  if (!fuelGiven) warn("fuel_not_given", withDrift ? "fuel at the start and end of the stint not given: the static-load change (fuel burn, pot drift) is fitted as a linear trend, which can take up part of the aero's speed dependence; give the fuel (--fuel-start-kg, --fuel-end-kg) for firmer band balances" : "fuel at the start and end of the stint not given and the log is too short to fit a static-load trend: a fuel burn during the log is not modelled");
  // Sign checks against the rate of change of speed d (see SummaryBuilder.sign): a long_accel logged
  // the other way would turn the load-transfer correction round, so no aero figures are given then.
  const sign = s.sign;
  const cov = (sx: number, sy: number, sxy: number) => sxy / sign.n - (sx / sign.n) * (sy / sign.n);
  const varD = cov(sign.sd, sign.sd, sign.sdd), varA = cov(sign.sa, sign.sa, sign.saa);
  const axR = sign.n >= MIN_SIGN_SAMPLES ? cov(sign.sa, sign.sd, sign.sad) / Math.sqrt(varD * varA) : NaN;
  const axInverted = axR < -0.5;
  if (axInverted) warn("suspected_sign_error", `long_accel reads opposite to the change of speed (correlation ${axR.toFixed(2)}): invert it in the channel map (braking negative). ClA and balance are not estimated until then: the load-transfer correction would go the wrong way`);
  // Units by the same kinematics: σ(long_accel) / σ(dv/dt) is ≈ 1 with the right units (unit-check.ts).
  // A time unit slip (the log's rate) explains any disagreement of sizes with dv/dt: it is named alone.
  const rateSlip = sampleRateProblem(s.sampleRateHz, s.rows);
  if (rateSlip) warn("suspected_unit_error", `${rateSlip}. ClA, balance and understeer gradients are not estimated until then`);
  const unitSlip = axInverted || rateSlip || !(axR > 0.5) ? null : longAccelScaleProblem(Math.sqrt(varA / varD));
  if (unitSlip) warn("suspected_unit_error", `${unitSlip.problem}. ${unitSlip.speed ? "ClA, balance and understeer gradients are" : "ClA and balance are"} not estimated until then`);
  // Sizes of the other channels, read off the decimated traces (unit-check.ts).
  const tr = s.traces.state();
  const at = (name: (typeof TRACE_CHANNELS)[number]) => TRACE_CHANNELS.indexOf(name);
  const sizes = traceSizes(tr.buckets, TRACE_CHANNELS.length, tr.lo, tr.hi, {
    speed: at("speed_kmh"), lat: at("lat_accel_g"), steer: at("steer_deg"), dampers: [at("damper_fl_mm"), at("damper_fr_mm"), at("damper_rl_mm"), at("damper_rr_mm")],
  }, c.steeringRatio, c.wheelbaseM);
  const damperSlips = sizes.speedSpanKmh < 60 || duration < 60 ? [] : (["damper_fl", "damper_fr", "damper_rl", "damper_rr"] as const).map((ch, i) => damperRangeProblem(ch, sizes.damperRangeMm[i])).filter((p): p is string => p !== null);
  for (const p of damperSlips) warn("suspected_unit_error", `${p}. ClA and balance are not estimated until then`);
  const latSlip = latAccelScaleProblem(sizes);
  if (latSlip) warn("suspected_unit_error", `${latSlip}. Understeer gradients are not estimated until then`);
  const steerSlip = latSlip || unitSlip?.speed ? null : steerScaleProblem(sizes.steerRatio);
  if (steerSlip) warn("suspected_unit_error", `${steerSlip}. Understeer gradients are not estimated until then`);
  let fit: AeroFit | null = null;
  let alt: AeroFit | null = null;
  if (axInverted || unitSlip || rateSlip || damperSlips.length > 0) {
    // No fit: the warning above says why.
  } else if (s.aero.blocks.n >= MIN_AERO_BLOCKS) {
    fit = fitAero(s.aero, withIntercept, withDrift, knownDrift);
    alt = fitAero(s.aero, !withIntercept, withDrift, knownDrift);
    if (!fit) warn("aero_fit_failed", "the aero fit could not be solved: the usable samples do not span enough speeds");
  } else {
    warn("few_aero_samples", `only ${s.aero.blocks.n} s of usable running for the aero fit (at least ${MIN_AERO_BLOCKS} s above ${s.opts.gates.aero_min_speed_kmh} km/h with |ax| ≤ ${s.opts.gates.aero_max_long_g} g are needed), so ClA and balance are not estimated`);
  }
  // Braking (dv/dt < 0) compresses the front: front travel falls with dv/dt, rear travel rises with it.
  const enoughSign = sign.n >= MIN_SIGN_SAMPLES;
  // Travel = a + b·d + c·v² per axle: b is the pitch with the aero held apart (braking happens at
  // speed, where the aero also compresses the car); plain slope on d when v² does not vary apart from d.
  const varW = cov(sign.sq, sign.sq, sign.sqq), covDW = cov(sign.sd, sign.sq, sign.sdq), det = varD * varW - covDW * covDW;
  const pitch = (sx: number, sdx: number, sqx: number) => {
    const cdx = cov(sign.sd, sx, sdx), cwx = cov(sign.sq, sx, sqx);
    return det > 1e-6 * varD * varW ? (varW * cdx - covDW * cwx) / det : cdx / varD;
  };
  const pitchF = enoughSign ? pitch(sign.sf, sign.sdf, sign.sqf) : NaN, pitchR = enoughSign ? pitch(sign.sr, sign.sdr, sign.sqr) : NaN;
  // A wrong pitch with a negative ClA on the same axle is an inverted channel, not lift: no aero figures then.
  const invertedF = pitchF > 0.5 && fit !== null && fit.front.cla_m2 < 0, invertedR = pitchR < -0.5 && fit !== null && fit.rear.cla_m2 < 0;
  const aeroUntil = invertedF || invertedR ? "; ClA and balance are not estimated until then" : "";
  if (pitchF > 0.5) warn("suspected_sign_error", `the front dampers extend under braking and compress under acceleration: check the front damper channels' invert flag${aeroUntil}`);
  if (pitchR < -0.5) warn("suspected_sign_error", `the rear dampers compress under braking: check the rear damper channels' invert flag${aeroUntil}`);
  if (invertedF || invertedR) fit = alt = null;
  // Aero models in which ClA may vary (aero-model.ts): chosen by BIC on block means; the chosen
  // model's static load and drift then stand for all figures (bands are measured loads less those).
  const variation = fit ? chooseAeroModel(s, fit, { withIntercept, withDrift, knownDrift }) : null;
  if (fit && s.aero.blocks.n < FEW_AERO_BLOCKS) warn("few_aero_samples", `the aero fit rests on only ${s.aero.blocks.n} s of running: treat ClA and balance as rough`);
  if (s.aeroWaitingStatic > 0) warn("static_estimated", `${s.aeroWaitingStatic} samples waited for a static damper estimate before the bump-stop model could place contact; give static_damper_mm in the car file to use them`);
  if (!s.staticGiven) flags.push("static_from_fit_intercept");
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
  const staticRef = s.staticReference(aeroShift);
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

  // Steering offset and understeer per band.
  const firstBin = Math.round(s.opts.gates.us_min_lat_g / 0.05);
  const offset = estimateSteeringOffset(s.us, MIN_OFFSET_BLOCKS, c.steeringRatio, firstBin);
  if (offset.source === "corners") warn("steering_offset_from_corners", "too few straight-line samples for the steering offset; it was estimated from corners of both directions instead");
  if (offset.source === "none") warn("steering_offset_unknown", "the steering offset could not be estimated (no straights and corners of one direction only): understeer gradients are not given");
  if (offset.offset_deg !== null && Math.abs(offset.offset_deg) > LARGE_OFFSET_DEG) warn("large_steering_offset", `the steering wheel reads ${offset.offset_deg.toFixed(1)}° on the straights: check the steering sensor's zero (it is removed from the understeer figures)`);
  // A sign mismatch between steering, lateral acceleration and yaw rate turns the understeer angle
  // into nonsense (the path curvature comes out with the wrong sign): no gradient is given then.
  const steerLatWrong = s.us.signNorm > 0 && s.us.signDot < 0;
  const yawLatWrong = s.yawSignN > 50 && s.yawSignDot < 0;
  const usUntil = "; understeer gradients are not given until then";
  if (steerLatWrong) warn("suspected_sign_error", `steering and lateral acceleration have opposite signs in corners: invert one of them in the channel map (left turn positive for both)${usUntil}`);
  if (yawLatWrong) warn("suspected_sign_error", `yaw rate and lateral acceleration have opposite signs: invert one of them in the channel map${usUntil}`);
  // A wrong speed unit scales every curvature (ay/V² or r/V) and so the understeer angle; a wrong
  // lat_accel or steer unit scales the terms of the steering relation itself.
  const understeerUnsound = steerLatWrong || yawLatWrong || unitSlip?.speed === true || latSlip !== null || steerSlip !== null || rateSlip !== null;

  const emptyBands = s.opts.bandEdgesKmh.slice(0, -1).map((lo, b) => [lo, s.opts.bandEdgesKmh[b + 1], s.bandRows[b]] as const).filter((x) => x[2] === 0);
  if (emptyBands.length) warn("empty_band", `no samples in ${emptyBands.map(([lo, hi]) => `${lo}–${hi}`).join(", ")} km/h: those bands have no figures`);
  if (!s.staticGiven && s.estN < s.estMin) warn("no_ride_height_reference", "ride-height changes need a static damper reference: give static_damper_mm, or log some slow running (under 60 km/h) at the start");
  if (!s.mapped.has("ride_height_front") || !s.mapped.has("ride_height_rear")) flags.push("ride_height_from_dampers_only");
  if (s.mapped.has("yaw_rate")) flags.push("curvature_from_yaw_rate");
  if (s.hasBumpStops) flags.push("bump_stops_modelled");
  if (withDrift) flags.push("static_load_drift_modelled");
  const bands: BandSummary[] = [];
  const bandBalances: BandBalance[] = [];
  const rate = Number.isFinite(s.sampleRateHz) && s.sampleRateHz > 0 ? s.sampleRateHz : 1;
  const cogMm = cogFromFrontAxleMm(s.car.wheelbase_mm, s.car.static_front_weight_pct);
  const a = s.aero.bands;
  const edges = s.opts.bandEdgesKmh;
  const weightN = c.massKg * STANDARD_GRAVITY_M_PER_S2;
  for (let b = 0; b < s.bandCount; b++) {
    const label = `${edges[b]}–${edges[b + 1]} km/h`;
    const n = a.n[b];
    const loadF = fit && n > 0 ? bandAeroLoadN(n, a.st[b], a.sf[b], fit.front) : NaN;
    const loadR = fit && n > 0 ? bandAeroLoadN(n, a.st[b], a.sr[b], fit.rear) : NaN;
    const qMean = n > 0 ? a.sq[b] / n : NaN;
    let bal = NaN;
    if (fit && n === 0 && s.bandRows[b] > 0) warn("band_no_aero_samples", `${label}: none of the ${s.bandRows[b]} samples passed the aero gates (|ax| ≤ ${s.opts.gates.aero_max_long_g} g, steady dampers, above ${s.opts.gates.aero_min_speed_kmh} km/h)`);
    if (fit && n > 0) {
      if (loadF + loadR > BAND_BALANCE_MIN_LOAD_SHARE * weightN) bal = (100 * loadF) / (loadF + loadR);
      else if (s.bandRows[b] > 0) warn("band_balance_low_load", `${label}: aero load (${(loadF + loadR).toFixed(0)} N) is under ${BAND_BALANCE_MIN_LOAD_SHARE * 100} % of the car's weight, too small to split between the axles`);
    }
    const offRoad = offset.offset_deg === null ? NaN : offset.offset_deg / c.steeringRatio;
    const us = offset.offset_deg === null || understeerUnsound ? null : bandUndersteer(s.us, b, offRoad, s.opts.gates.us_max_lat_fraction_of_peak);
    const steadyS = us ? us.samples / rate : 0;
    let k = NaN;
    if (us && steadyS >= MIN_US_SECONDS) {
      k = us.k_deg_per_g;
      if (steadyS < FEW_US_SECONDS) warn("few_understeer_samples", `${label}: the understeer gradient rests on ${steadyS.toFixed(1)} s of steady cornering: treat it as rough`);
      if (Math.min(us.left_samples, us.right_samples) < 0.1 * (us.left_samples + us.right_samples)) warn("one_turn_direction", `${label}: steady corners are nearly all one direction, so a steering-offset error goes straight into the understeer gradient`);
    } else if (s.bandRows[b] > 0 && offset.offset_deg !== null && !understeerUnsound) {
      warn("few_understeer_samples", `${label}: only ${steadyS.toFixed(1)} s of steady cornering (|ay| ≥ ${s.opts.gates.us_min_lat_g} g, steering rate ≤ ${s.opts.gates.us_max_steer_rate_deg_s}°/s, |ax| ≤ ${s.opts.gates.us_max_long_g} g on the smoothed channels); at least ${MIN_US_SECONDS} s are needed for an understeer gradient`);
    }
    const rh = rideHeights(s, staticRef, b, loadF, loadR);
    const bandCop = Number.isFinite(bal) ? copFromFrontAxleMm(s.car.wheelbase_mm, bal) : NaN;
    // Balance interval from the band's block means (delta method on F/(F + R)).
    const spread = fit ? s.aero.bandBlockSpread(b, fit.front.drift_n_per_s, fit.rear.drift_n_per_s) : null;
    let balCi: [number, number] | null = null;
    let claFCi: [number, number] | null = null, claRCi: [number, number] | null = null;
    if (spread && fit && n > 0 && spread.blocks >= MIN_BAND_BLOCKS) {
      // Sampling spread of the band means, plus the fitted static load's uncertainty at the band's mean time.
      const tau = a.st[b] / n;
      const vF = spread.varF / spread.blocks + offsetVariance(fit.front, tau), vR = spread.varR / spread.blocks + offsetVariance(fit.rear, tau);
      claFCi = interval95(loadF / qMean, Math.sqrt(vF) / qMean, spread.blocks - 1);
      claRCi = interval95(loadR / qMean, Math.sqrt(vR) / qMean, spread.blocks - 1);
    }
    if (spread && Number.isFinite(bal) && spread.blocks >= MIN_BAND_BLOCKS) {
      const total = loadF + loadR;
      const gF = (100 * loadR) / (total * total), gR = (-100 * loadF) / (total * total);
      const tau = a.st[b] / n;
      const vF = spread.varF / spread.blocks + offsetVariance(fit!.front, tau), vR = spread.varR / spread.blocks + offsetVariance(fit!.rear, tau);
      const v = gF * gF * vF + gR * gR * vR + (2 * gF * gR * spread.cov) / spread.blocks;
      balCi = interval95(bal, Math.sqrt(Math.max(0, v)), spread.blocks - 1);
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
      understeer_gradient_deg_per_g: r(k, 3),
      understeer_ci95_deg_per_g: Number.isFinite(k) && us ? roundPair(us.ci95_deg_per_g, 3) : null,
      understeer_samples: us ? us.samples : 0,
      understeer_blocks: us ? us.segments : 0,
      understeer_lat_g_range: us ? roundPair([s.opts.gates.us_min_lat_g, us.upper_gate_g], 3) : null,
      ...rh,
      duration_s: r(s.bandRows[b] / rate, 2) ?? 0,
      mean_speed_kmh: r(s.bandRows[b] > 0 ? (s.bandSpeedSum[b] / s.bandRows[b]) * KMH_PER_M_PER_S : NaN, 2),
      cla_front_ci95_m2: roundPair(claFCi, 4),
      cla_rear_ci95_m2: roundPair(claRCi, 4),
      cop_from_front_axle_mm: r(bandCop, 1),
      cop_behind_cog_mm: r(bandCop - cogMm, 1),
      steady_cornering_s: r(Number.isFinite(k) ? steadyS : 0, 2) ?? 0,
    });
    bandBalances.push({ bal, ci: balCi, aeroS: n / rate });
  }

  const copMm = Number.isFinite(balance) ? copFromFrontAxleMm(s.car.wheelbase_mm, balance) : NaN;
  const dropped = ctx.droppedCells ?? {};
  const totalDropped = Object.values(dropped).reduce((x, y) => x + y, 0);
  const unreadable = Object.entries(ctx.badCells ?? {}).filter(([, n]) => n > 0);
  if (unreadable.length) warn("unreadable_cells", `cells that hold no readable number (text, or a value past the number range such as 1e309) were left out as dropouts: ${unreadable.map(([col, n]) => `"${col}" ${n}`).join(", ")}`);
  const short = ctx.shortRows;
  if (short && short.count > 0) {
    const unit = ctx.map?.time?.unit ?? "";
    const named = short.times.slice(0, SHORT_ROWS_NAMED).map((t) => (Number.isFinite(t) ? `${Number(t.toPrecision(12))} ${unit}`.trim() : "a row without a time"));
    warn("short_rows", `${short.count} row${short.count === 1 ? "" : "s"} with fewer cells than the header ${short.count === 1 ? "was" : "were"} left out (a row cut short, or one that lost a delimiter, would put values in the wrong columns): at time ${named.join(", ")}${short.count > named.length ? ", …" : ""}`);
  }
  if (s.rows > 0 && totalDropped > 0.01 * s.rows) warn("dropouts", `${totalDropped} empty or unreadable cells in the mapped columns: those samples are left out`);
  const driftChange = (af: AeroFit | null, side: "front" | "rear") => (af && af.with_drift ? r(af[side].drift_n_per_s * duration, 1) : null);
  const traceFit = fit;
  return {
    summary_version: SUMMARY_VERSION,
    car: s.car,
    mapping: ctx.map ?? null,
    metadata: ctx.header?.metadata ?? {},
    log: { rows: ctx.rows ?? s.rows, bytes: ctx.bytes ?? null, columns: ctx.header?.columns ?? [], dropped_cells: dropped },
    samples: s.rows,
    duration_s: r(duration, 3) ?? 0,
    sample_rate_hz: r(s.sampleRateHz, 2),
    air_density_kg_m3: r(s.air.density_kg_m3, 5)!,
    air: { temp_c: r(s.air.temp_c, 2)!, pressure_hpa: r(s.air.pressure_hpa, 2)!, humidity_pct: s.air.humidity_pct, source: s.air.source },
    aero: {
      cla_front_m2: r(claF, 4),
      cla_rear_m2: r(claR, 4),
      cla_total_m2: r(claT, 4),
      balance_front_pct: r(balance, 2),
      cla_front_ci95_m2: fit ? roundPair(fit.front.cla_ci95_m2, 4) : null,
      cla_rear_ci95_m2: fit ? roundPair(fit.rear.cla_ci95_m2, 4) : null,
      balance_front_ci95_pct: roundPair(balanceCi, 2),
      samples: s.aero.samples.n,
      blocks: s.aero.blocks.n,
      model: fit ? (withIntercept ? "with_intercept" : "through_origin") : null,
      fuel_drift_modelled: withDrift,
      front: { cla_m2: r(claF, 4), cla_ci95_m2: fit ? roundPair(fit.front.cla_ci95_m2, 4) : null, static_load_change_over_stint_n: driftChange(fit, "front"), residual_sd_n: fit ? r(fit.front.residual_sd_n, 1) : null },
      rear: { cla_m2: r(claR, 4), cla_ci95_m2: fit ? roundPair(fit.rear.cla_ci95_m2, 4) : null, static_load_change_over_stint_n: driftChange(fit, "rear"), residual_sd_n: fit ? r(fit.rear.residual_sd_n, 1) : null },
      alternative: alt ? { model: alt.with_intercept ? "with_intercept" : "through_origin", cla_front_m2: r(alt.front.cla_m2, 4), cla_rear_m2: r(alt.rear.cla_m2, 4) } : null,
      bump_stop_contact_front_pct: r(contactPct.front, 2),
      bump_stop_contact_rear_pct: r(contactPct.rear, 2),
      variation_model: variation ? variation.chosen : "constant",
      variation_criterion: { name: variation ? variation.criterion : "none: no aero fit", scores: variation ? variation.scores : { constant: null, speed_band: null, ride_height: null } },
      balance_shift: balanceShift(bands, bandBalances, s.car.wheelbase_mm),
      ride_height_sensitivity: variation && fit ? rideHeightSensitivity(s, variation, fit) : null,
    },
    fuel: {
      source: fuelGiven ? "given" : withDrift && fit ? "fitted_drift" : "not_modelled",
      start_kg: fuelGiven ? fuelGiven.startKg : null,
      end_kg: fuelGiven ? fuelGiven.endKg : null,
      tank_from_front_axle_mm: c.fuelTankFromFrontAxleM === null ? null : r(c.fuelTankFromFrontAxleM * 1000, 1),
      static_load_change_front_n: fuelChange ? r(fuelChange.front, 1) : driftChange(fit, "front"),
      static_load_change_rear_n: fuelChange ? r(fuelChange.rear, 1) : driftChange(fit, "rear"),
    },
    static_damper_mm: staticRef
      ? { source: staticRef.source, fl: r(staticRef.fl, 2)!, fr: r(staticRef.fr, 2)!, rl: r(staticRef.rl, 2)!, rr: r(staticRef.rr, 2)!, samples: staticRef.samples }
      : null,
    cop: { from_front_axle_mm: r(copMm, 1), cog_from_front_axle_mm: r(cogMm, 1)!, cop_behind_cog_mm: r(copMm - cogMm, 1) },
    steering: {
      offset_deg: r(offset.offset_deg ?? NaN, 3),
      offset_ci95_deg: roundPair(offset.ci95_deg, 3),
      offset_samples: offset.samples,
      offset_source: offset.source,
      curvature_source: s.mapped.has("yaw_rate") ? "yaw_rate" : "lat_accel",
    },
    bands,
    aero_map_front_ride_height: rideHeightMap(s, fit, weightN, -aeroShift.front / c.motionRatioFront),
    traces: s.traces.output(
      { speed_kmh: 1, lat_accel_g: 3, long_accel_g: 3, steer_deg: 1, axle_load_front_n: 0, axle_load_rear_n: 0, yaw_rate_deg_s: 1 },
      (name, t, v) => {
        if (name === "speed_kmh") return v * KMH_PER_M_PER_S;
        if (name === "lat_accel_g" || name === "long_accel_g") return v / STANDARD_GRAVITY_M_PER_S2;
        if (name !== "axle_load_front_n" && name !== "axle_load_rear_n") return v;
        if (!traceFit) return NaN;
        const af = name === "axle_load_front_n" ? traceFit.front : traceFit.rear;
        return v - af.intercept_n - af.drift_n_per_s * (t - s.t0);
      },
    ),
    quality: { flags, aero_samples_waiting_for_static: s.aeroWaitingStatic },
    warnings,
    cautions: [...CAUTIONS],
    notes: [...METHOD_NOTES, ...(s.mapped.has("ride_height_front") || s.mapped.has("ride_height_rear") ? [RIDE_HEIGHT_NOTE] : [])],
  };
}

interface BandBalance { bal: number; ci: [number, number] | null; aeroS: number }

/**
 * Balance shift by BALANCE_SHIFT_RULE (bands.ts): from the lowest to the highest band whose balance
 * is given and that holds enough aero running; the two bands' balance intervals taken as independent
 * for the interval of the difference.
 */
function balanceShift(bands: BandSummary[], bb: BandBalance[], wheelbaseMm: number): SessionSummary["aero"]["balance_shift"] {
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

function rideHeights(s: SummaryBuilder, st: StaticReference | null, b: number, loadF: number, loadR: number) {
  const a = s.aero.bands;
  const n = a.n[b];
  const c = s.model;
  const staticF = st ? (st.fl + st.fr) / 2 : NaN;
  const staticR = st ? (st.rl + st.rr) / 2 : NaN;
  const kt = s.opts.tyreRateNPerMm;
  // Suspension travel at the wheel (damper travel / MR) plus the tyre's deflection under the same
  // spring force change (Ks·MR per mm of damper travel, per wheel): the springs and tyre in series.
  const dF = n > 0 ? a.dampFront[b] / n / 2 - staticF : NaN, dR = n > 0 ? a.dampRear[b] / n / 2 - staticR : NaN;
  const changeF = -dF / c.motionRatioFront - (c.forcePerMmFront * dF) / kt;
  const changeR = -dR / c.motionRatioRear - (c.forcePerMmRear * dR) / kt;
  void loadF; void loadR;
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
 * Bins with at least 2 s of samples; balance only where the aero load is ≥ 5 % of the weight.
 * `edgeShiftMm`: the samples were binned against the streaming static reference; once that is
 * corrected (static-estimate.ts) every sample's ride-height change moves by the same amount, and so
 * do the bin edges.
 */
function rideHeightMap(s: SummaryBuilder, fit: AeroFit | null, weightN: number, edgeShiftMm: number): SessionSummary["aero_map_front_ride_height"] {
  const out: SessionSummary["aero_map_front_ride_height"] = [];
  if (!fit) return out;
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
      balance_front_pct: f + rr > 0.05 * weightN ? r((100 * f) / (f + rr), 2) : null,
    });
  }
  return out;
}

/**
 * The finishing stages in order (channel checks → aero fit → bands → understeer), then stage 6, the
 * output: the SessionSummary from the state the row loop wrote and the stages' results.
 */
import type { AeroFit } from "./aero";
import { cogFromFrontAxleMm, copFromFrontAxleMm } from "./physics";
import { roundOrNull as r, roundPair } from "./stats";
import { aeroStage, rideHeightSensitivity } from "./summary-aero";
import { bandStage, rideHeightMap } from "./summary-bands";
import type { BandAero } from "./summary-bands";
import { channelChecks } from "./summary-checks";
import type { SummaryState } from "./summary-state";
import { CAUTIONS, METHOD_NOTES, RIDE_HEIGHT_NOTE, SUMMARY_VERSION } from "./summary-types";
import type { BandSummary, FinishContext, SessionSummary, SummaryWarning } from "./summary-types";
import { understeerStage } from "./summary-understeer";
import type { BandUndersteerRow } from "./summary-understeer";
import { KMH_PER_M_PER_S, STANDARD_GRAVITY_M_PER_S2 } from "./units";

/** Short rows named by their time in the warning. */
const SHORT_ROWS_NAMED = 5;

export function buildSummary(s: SummaryState, ctx: FinishContext): SessionSummary {
  const warnings: SummaryWarning[] = [];
  const warn = (code: string, message: string) => warnings.push({ code, message });
  const c = s.model;
  const duration = s.rows > 1 ? s.tLast - s.t0 : 0;
  if (s.air.source !== "given") warn("air_density_assumed", `air density ${s.air.density_kg_m3.toFixed(4)} kg/m³ uses ${s.air.source === "partly_given" ? "ISA sea level for the value not given" : "ISA sea level (15 °C, 1013.25 hPa)"}; give --air-temp-c and --air-pressure-hpa for the session's weather`);

  const checks = channelChecks(s, duration, warn);
  const aero = aeroStage(s, checks, duration, warn);
  const { fit, alt, variation, claF, claR, claT, balance, fuelChange, withDrift } = aero;
  const emptyBands = s.opts.bandEdgesKmh.slice(0, -1).map((lo, b) => [lo, s.opts.bandEdgesKmh[b + 1], s.bandRows[b]] as const).filter((x) => x[2] === 0);
  if (emptyBands.length) warn("empty_band", `no samples in ${emptyBands.map(([lo, hi]) => `${lo}–${hi}`).join(", ")} km/h: those bands have no figures`);
  if (!s.staticGiven && s.estN < s.estMin) warn("no_ride_height_reference", "ride-height changes need a static damper reference: give static_damper_mm, or log some slow running (under 60 km/h) at the start");
  const bandFigures = bandStage(s, aero, warn);
  const understeer = understeerStage(s, checks, warn);
  const { offset } = understeer;

  const flags: string[] = [];
  if (!s.staticGiven) flags.push("static_from_fit_intercept");
  if (!s.mapped.has("ride_height_front") || !s.mapped.has("ride_height_rear")) flags.push("ride_height_from_dampers_only");
  if (s.mapped.has("yaw_rate")) flags.push("curvature_from_yaw_rate");
  if (s.hasBumpStops) flags.push("bump_stops_modelled");
  if (withDrift) flags.push("static_load_drift_modelled");

  const cogMm = cogFromFrontAxleMm(s.car.wheelbase_mm, s.car.static_front_weight_pct);
  const copMm = Number.isFinite(balance) ? copFromFrontAxleMm(s.car.wheelbase_mm, balance) : NaN;
  inputWarnings(s, ctx, warn);
  const driftChange = (af: AeroFit | null, side: "front" | "rear") => (af && af.with_drift ? r(af[side].drift_n_per_s * duration, 1) : null);
  const fuelGiven = s.opts.fuel;
  const staticRef = aero.staticRef;
  return {
    summary_version: SUMMARY_VERSION,
    car: s.car,
    mapping: ctx.map ?? null,
    metadata: ctx.header?.metadata ?? {},
    log: { rows: ctx.rows ?? s.rows, bytes: ctx.bytes ?? null, columns: ctx.header?.columns ?? [], dropped_cells: ctx.droppedCells ?? {} },
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
      balance_front_ci95_pct: roundPair(aero.balanceCi, 2),
      samples: s.aero.samples.n,
      blocks: s.aero.blocks.n,
      model: fit ? (aero.withIntercept ? "with_intercept" : "through_origin") : null,
      fuel_drift_modelled: withDrift,
      front: { cla_m2: r(claF, 4), cla_ci95_m2: fit ? roundPair(fit.front.cla_ci95_m2, 4) : null, static_load_change_over_stint_n: driftChange(fit, "front"), residual_sd_n: fit ? r(fit.front.residual_sd_n, 1) : null },
      rear: { cla_m2: r(claR, 4), cla_ci95_m2: fit ? roundPair(fit.rear.cla_ci95_m2, 4) : null, static_load_change_over_stint_n: driftChange(fit, "rear"), residual_sd_n: fit ? r(fit.rear.residual_sd_n, 1) : null },
      alternative: alt ? { model: alt.with_intercept ? "with_intercept" : "through_origin", cla_front_m2: r(alt.front.cla_m2, 4), cla_rear_m2: r(alt.rear.cla_m2, 4) } : null,
      bump_stop_contact_front_pct: r(aero.contactPct.front, 2),
      bump_stop_contact_rear_pct: r(aero.contactPct.rear, 2),
      variation_model: variation ? variation.chosen : "constant",
      variation_criterion: { name: variation ? variation.criterion : "none: no aero fit", scores: variation ? variation.scores : { constant: null, speed_band: null, ride_height: null, ride_height_front_rear: null } },
      balance_shift: bandFigures.balanceShift,
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
    bands: bandFigures.bands.map((a, b) => bandRow(a, understeer.bands[b])),
    aero_map_front_ride_height: rideHeightMap(s, fit, -aero.aeroShift.front / c.motionRatioFront),
    traces: s.traces.output(
      { speed_kmh: 1, lat_accel_g: 3, long_accel_g: 3, steer_deg: 1, axle_load_front_n: 0, axle_load_rear_n: 0, yaw_rate_deg_s: 1 },
      (name, t, v) => {
        if (name === "speed_kmh") return v * KMH_PER_M_PER_S;
        if (name === "lat_accel_g" || name === "long_accel_g") return v / STANDARD_GRAVITY_M_PER_S2;
        if (name !== "axle_load_front_n" && name !== "axle_load_rear_n") return v;
        if (!fit) return NaN;
        const af = name === "axle_load_front_n" ? fit.front : fit.rear;
        return v - af.intercept_n - af.drift_n_per_s * (t - s.t0);
      },
    ),
    quality: { flags, aero_samples_waiting_for_static: s.aeroWaitingStatic },
    warnings,
    cautions: [...CAUTIONS],
    notes: [...METHOD_NOTES, ...(s.mapped.has("ride_height_front") || s.mapped.has("ride_height_rear") ? [RIDE_HEIGHT_NOTE] : [])],
  };
}

/** One band's row: the band stage's figures with the understeer stage's, in the contract's field order. */
function bandRow(a: BandAero, u: BandUndersteerRow): BandSummary {
  const { min_kmh, max_kmh, samples, aero_samples, mean_dynamic_pressure_pa, aero_load_front_n, aero_load_rear_n, balance_front_pct, balance_front_ci95_pct, aero_blocks, cla_front_m2, cla_rear_m2, ...rest } = a;
  const { steady_cornering_s, ...us } = u;
  return { min_kmh, max_kmh, samples, aero_samples, mean_dynamic_pressure_pa, aero_load_front_n, aero_load_rear_n, balance_front_pct, balance_front_ci95_pct, aero_blocks, cla_front_m2, cla_rear_m2, ...us, ...rest, steady_cornering_s };
}

/** What the reading of the file left out: unreadable cells, rows with missing cells, many dropouts. */
function inputWarnings(s: SummaryState, ctx: FinishContext, warn: (code: string, message: string) => void): void {
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
}

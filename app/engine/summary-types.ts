/**
 * The stored session summary (what the database keeps and every screen reads). Plain JSON,
 * snake_case keys, units in the key names, null (never NaN) where a figure cannot be estimated;
 * a warning then says why. Bump `SUMMARY_VERSION` on any incompatible change.
 */
import type { CarInput, ChannelMap } from "./types";
import type { TraceOutput } from "./summary-traces";

/** 2: bands carry their own ClA (the aero may vary with speed and ride height), fuel and balance shift. */
export const SUMMARY_VERSION = 2;

export interface SummaryWarning {
  code: string;
  message: string;
}

export interface BandSummary {
  min_kmh: number;
  max_kmh: number;
  /** Rows whose speed lies in the band. */
  samples: number;
  aero_samples: number;
  mean_dynamic_pressure_pa: number | null;
  aero_load_front_n: number | null;
  aero_load_rear_n: number | null;
  balance_front_pct: number | null;
  /**
   * 95 % interval of the band's balance: the spread of its block means (1 s blocks with enough
   * samples) plus the fitted static load's uncertainty at the band's time, front and rear taken as
   * independent (conservative); null below 5 blocks. compare.ts sets two sessions side by side.
   */
  balance_front_ci95_pct: [number, number] | null;
  /** Time blocks that held enough of the band's aero samples. */
  aero_blocks: number;
  cla_front_m2: number | null;
  cla_rear_m2: number | null;
  understeer_gradient_deg_per_g: number | null;
  understeer_ci95_deg_per_g: [number, number] | null;
  understeer_samples: number;
  understeer_blocks: number;
  understeer_lat_g_range: [number, number] | null;
  ride_height_change_front_mm: number | null;
  ride_height_change_rear_mm: number | null;
  rake_change_mm: number | null;
  ride_height_front_mm: number | null;
  ride_height_rear_mm: number | null;
  rake_mm: number | null;
  /** Time the car spent in the band (rows / sample rate, s). */
  duration_s: number;
  mean_speed_kmh: number | null;
  cla_front_ci95_m2: [number, number] | null;
  cla_rear_ci95_m2: [number, number] | null;
  /** Centre of pressure at the band's balance, from the front axle, and behind the CoG (mm). */
  cop_from_front_axle_mm: number | null;
  cop_behind_cog_mm: number | null;
  /** Seconds of steady cornering the band's understeer gradient rests on. */
  steady_cornering_s: number;
}

/** How the static axle loads change over the stint (fuel burn). */
export interface FuelSummary {
  /** given = fuel at start and end known (CLI --fuel-start-kg/--fuel-end-kg, or the form's litres); fitted_drift = a linear trend fitted instead. */
  source: "given" | "fitted_drift" | "not_modelled";
  start_kg: number | null;
  end_kg: number | null;
  tank_from_front_axle_mm: number | null;
  /** Over the stint, given or fitted (N; negative = lighter). */
  static_load_change_front_n: number | null;
  static_load_change_rear_n: number | null;
}

export type AeroVariationModel = "constant" | "speed_band" | "ride_height" | "ride_height_front_rear";

/** Balance between the lowest and the highest band with enough aero load. */
export interface BalanceShift {
  /** Which bands: BALANCE_SHIFT_RULE (bands.ts), in words (absent in summaries stored before it was added). */
  rule?: string;
  low_band_kmh: [number, number];
  high_band_kmh: [number, number];
  /** balance(high) − balance(low), % points; positive = balance moves forward with speed. */
  points: number;
  ci95_points: [number, number] | null;
  /** CoP(low) − CoP(high), CoP from the front axle; positive = CoP moves forward with speed. */
  cop_shift_mm: number;
  cop_shift_ci95_mm: [number, number] | null;
}

/** Balance and total ClA against the front ride-height change (per mm; positive = rises as the nose rises). */
export interface RideHeightSensitivity {
  front_ride_height_span_mm: [number, number];
  balance_pct_per_mm: number;
  balance_ci95_pct_per_mm: [number, number] | null;
  cla_total_m2_per_mm: number;
  cla_total_ci95_m2_per_mm: [number, number] | null;
}

export interface AxleFitSummary {
  cla_m2: number | null;
  cla_ci95_m2: [number, number] | null;
  static_load_change_over_stint_n: number | null;
  residual_sd_n: number | null;
}

export interface SessionSummary {
  summary_version: typeof SUMMARY_VERSION;
  car: CarInput;
  mapping: ChannelMap | null;
  metadata: Record<string, string>;
  log: { rows: number; bytes: number | null; columns: string[]; dropped_cells: Record<string, number> };
  samples: number;
  duration_s: number;
  sample_rate_hz: number | null;
  air_density_kg_m3: number;
  /** The weather the density rests on; humidity_pct null = dry air assumed. */
  air: { temp_c: number; pressure_hpa: number; humidity_pct: number | null; source: "isa_sea_level" | "given" | "partly_given" };
  aero: {
    cla_front_m2: number | null;
    cla_rear_m2: number | null;
    cla_total_m2: number | null;
    balance_front_pct: number | null;
    cla_front_ci95_m2: [number, number] | null;
    cla_rear_ci95_m2: [number, number] | null;
    balance_front_ci95_pct: [number, number] | null;
    samples: number;
    blocks: number;
    model: "through_origin" | "with_intercept" | null;
    fuel_drift_modelled: boolean;
    front: AxleFitSummary;
    rear: AxleFitSummary;
    /** The other fit variant, for comparison (through the origin vs with intercept). */
    alternative: { model: "through_origin" | "with_intercept"; cla_front_m2: number | null; cla_rear_m2: number | null } | null;
    bump_stop_contact_front_pct: number | null;
    bump_stop_contact_rear_pct: number | null;
    /** The aero model the figures come from: one ClA per axle, one per speed band, or ClA as a function of front ride height. */
    variation_model: AeroVariationModel;
    variation_criterion: { name: string; scores: Record<AeroVariationModel, number | null> };
    balance_shift: BalanceShift | null;
    ride_height_sensitivity: RideHeightSensitivity | null;
  };
  fuel: FuelSummary;
  /**
   * The static damper readings (mm, as mapped) that place bump-stop contact and ride-height changes:
   * the car file's, or estimated from slow running (`samples` of them); null when neither exists.
   */
  static_damper_mm: { source: "car_file" | "estimated"; fl: number; fr: number; rl: number; rr: number; samples: number } | null;
  cop: { from_front_axle_mm: number | null; cog_from_front_axle_mm: number; cop_behind_cog_mm: number | null };
  steering: {
    offset_deg: number | null;
    offset_ci95_deg: [number, number] | null;
    offset_samples: number;
    offset_source: "straights" | "corners" | "none";
    curvature_source: "yaw_rate" | "lat_accel";
  };
  bands: BandSummary[];
  /**
   * Balance against front ride height: bins of the front suspension's ride-height change from
   * static (wheel travel from the dampers; tyre deflection not included), negative = nose lower.
   */
  aero_map_front_ride_height: {
    ride_height_change_front_min_mm: number;
    ride_height_change_front_max_mm: number;
    samples: number;
    mean_dynamic_pressure_pa: number;
    aero_load_front_n: number | null;
    aero_load_rear_n: number | null;
    balance_front_pct: number | null;
  }[];
  traces: TraceOutput;
  quality: { flags: string[]; aero_samples_waiting_for_static: number };
  warnings: SummaryWarning[];
  cautions: string[];
  /** How to read the figures: what the method measures and assumes (shown beside them). */
  notes: string[];
}

/** What `finish` learns from the ingest step (all optional for direct use on blocks). */
export interface FinishContext {
  header?: { metadata: Record<string, string>; columns: string[] };
  map?: ChannelMap;
  rows?: number;
  bytes?: number;
  droppedCells?: Record<string, number>;
  /** Per mapped column: cells that hold no readable number (text, or a number past the double range such as 1e309). */
  badCells?: Record<string, number>;
  /** Rows left out for having fewer cells than the header (ingest.ts ShortRows). */
  shortRows?: { count: number; times: number[] };
}

/** Cautions the product shows with any number that can lead to a setup change (common practice). */
/** What the method measures and assumes (app/engine/README.md §1–2, common practice). */
export const METHOD_NOTES = [
  "Aero load is what the aero puts on each axle, measured at the springs: the drag's pitching moment is included, as in maps quoted at the contact patches.",
  "Dynamic pressure uses the logged ground speed as airspeed: wind along the straights adds error, so compare runs in both directions where you can.",
  "Load from damper travel assumes the springs, motion ratios and bump stops in the car file: a heave spring carries load the corner springs do not, and anti-dive or anti-squat geometry takes part of the load transfer past the springs.",
];

/** Shown when ride-height channels are logged (app/engine/README.md §3, common practice). */
export const RIDE_HEIGHT_NOTE =
  "Ride-height sensors read to the road, so tyre growth at speed raises them; the ride-height change worked out from the dampers leaves the tyre out, and the two part company at high speed.";

export const CAUTIONS = [
  "These figures are estimates from logged data, not safety margins.",
  "Make aero changes one at a time, in small steps, and build speed over installation laps with agreed abort criteria.",
  "Watch for balance moving forward under braking and at speed, wing stall, splitter or floor grounding, and lift when a closed car yaws.",
  "Check mounts for the higher loads and keep tyre loads and pressures within the maker's limits.",
  "Follow the series' technical regulations and scrutineering; never test on public roads.",
  "Confirm with track testing, wind tunnel or CFD and qualified engineers.",
];

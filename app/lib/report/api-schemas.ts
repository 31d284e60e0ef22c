/**
 * The data API's answers as zod schemas: the OpenAPI document's schemas are generated from these
 * (z.toJSONSchema, JSON Schema 2020-12 as OpenAPI 3.1 uses), and the contract tests parse real
 * answers with the same schemas, so the document and the answers cannot drift apart.
 */
import { z } from "zod";

const num = z.number().nullable();
const pair = z.tuple([z.number(), z.number()]).nullable();

export const errorSchema = z.object({ error: z.string() }).meta({ id: "Error", description: "What went wrong, in a sentence." });

export const sessionDetailSchema = z
  .object({
    id: z.string(),
    url: z.string().meta({ description: "The session's Balance report page." }),
    name: z.string(),
    date: z.string().nullable(),
    venue: z.string().nullable(),
    car: z.object({ id: z.string(), name: z.string() }),
    setup: z.object({ id: z.string(), sheet: z.string(), version: z.number().int() }),
    driver: z.string().nullable(),
    run: z.string().nullable(),
    state: z.enum(["received", "read", "checked", "flagged"]),
    state_detail: z.string().nullable(),
    checked_at: z.string().nullable(),
    engine_version: z.string().nullable(),
    summary_version: z.number().int().nullable(),
    air: z.object({ temp_c: num, pressure_hpa: num, humidity_pct: num, source: z.string().nullable() }),
    fuel_l: z.object({ start: num, end: num }).nullable(),
    tyre_notes: z.string().nullable(),
    notes: z.string().nullable(),
  })
  .meta({ id: "SessionDetail" });

export const bandSchema = z
  .looseObject({
    min_kmh: z.number(),
    max_kmh: z.number(),
    samples: z.number().int(),
    duration_s: z.number(),
    mean_speed_kmh: num,
    aero_load_front_n: num,
    aero_load_rear_n: num,
    cla_front_m2: num,
    cla_rear_m2: num,
    balance_front_pct: num,
    balance_front_ci95_pct: pair,
    understeer_gradient_deg_per_g: num,
    understeer_ci95_deg_per_g: pair,
    ride_height_change_front_mm: num,
    ride_height_change_rear_mm: num,
    rake_change_mm: num,
    cop_behind_cog_mm: num,
  })
  .meta({ id: "Band", description: "One speed band of the summary (more fields than listed: see summary_version 2)." });

export const summarySchema = z
  .looseObject({
    summary_version: z.number().int(),
    samples: z.number().int(),
    duration_s: z.number(),
    air_density_kg_m3: z.number(),
    aero: z.looseObject({ cla_front_m2: num, cla_rear_m2: num, cla_total_m2: num, balance_front_pct: num, balance_front_ci95_pct: pair }),
    cop: z.object({ from_front_axle_mm: num, cog_from_front_axle_mm: z.number(), cop_behind_cog_mm: num }),
    bands: z.array(bandSchema),
    warnings: z.array(z.object({ code: z.string(), message: z.string() })),
    cautions: z.array(z.string()),
  })
  .meta({ id: "Summary", description: "The engine's summary of record (the CLI's JSON without traces)." });

export const sessionResponseSchema = z.object({ session: sessionDetailSchema, summary: summarySchema.nullable() }).meta({ id: "SessionResponse" });

const minMax = z.object({ min: z.array(z.number().nullable()), max: z.array(z.number().nullable()) });
export const tracesSchema = z
  .object({ id: z.string(), bucket_rows: z.number().int(), t_s: z.array(z.number()), channels: z.record(z.string(), minMax) })
  .meta({ id: "Traces", description: "Decimated traces, columnar: each channel's min and max per time bucket, aligned with t_s." });

const change = z.object({ a: num, b: num, change: num, ci95: pair, clear: z.boolean() });
export const compareResponseSchema = z
  .object({
    baseline: z.string(),
    standard_density_kg_m3: z.number(),
    densities_differ: z.boolean(),
    sessions: z.array(
      sessionDetailSchema.extend({
        air_density_kg_m3: z.number(),
        cla_front_m2: num,
        cla_rear_m2: num,
        cla_total_m2: num,
        balance_front_pct: num,
        balance_front_ci95_pct: pair,
        balance_shift: z.looseObject({ points: z.number(), ci95_points: pair }).nullable(),
        advice: z.array(z.object({ problem: z.string(), evidence: z.string(), direction: z.string(), source: z.literal("common practice") })),
        bands: z.array(
          z.object({
            min_kmh: z.number(),
            max_kmh: z.number(),
            mean_speed_kmh: num,
            balance_front_pct: num,
            balance_front_ci95_pct: pair,
            understeer_gradient_deg_per_g: num,
            understeer_ci95_deg_per_g: pair,
            aero_load_front_n_std_air: num,
            aero_load_rear_n_std_air: num,
          }),
        ),
      }),
    ),
    differences: z.array(
      z.object({
        id: z.string(),
        against: z.string(),
        comparison: z.object({
          cla_front_m2: change,
          cla_rear_m2: change,
          balance_front_pct: change,
          bands: z.array(z.object({ min_kmh: z.number(), max_kmh: z.number(), balance_front_pct: change, understeer_gradient_deg_per_g: change })),
          notes: z.array(z.string()),
        }),
        setup_changes: z.array(z.object({ field: z.string(), label: z.string(), before: z.string(), after: z.string(), unit: z.string() })),
        sentences: z.array(z.string()),
      }),
    ),
  })
  .meta({ id: "Comparison" });

export const carsResponseSchema = z
  .object({
    cars: z.array(
      z.object({ id: z.string(), name: z.string(), category: z.string().nullable(), wheelbase_mm: z.number(), mass_kg: z.number(), static_front_weight_pct: z.number(), setup_sheets: z.number().int() }),
    ),
  })
  .meta({ id: "Cars" });

export const setupsResponseSchema = z
  .object({
    car: z.object({ id: z.string(), name: z.string() }),
    setups: z.array(z.object({ id: z.string(), sheet_id: z.string(), sheet: z.string(), version: z.number().int(), change_note: z.string().nullable(), created_at: z.string(), archived: z.boolean() })),
  })
  .meta({ id: "Setups" });

/** GET /api/sessions (served by the ingest routes; described here from issue 11's shape). */
export const sessionListSchema = z
  .object({
    sessions: z.array(
      z.looseObject({
        id: z.string(),
        url: z.string(),
        date: z.string().nullable(),
        venue: z.unknown(),
        car: z.unknown(),
        setup: z.unknown(),
        driver: z.unknown(),
        run: z.string().nullable(),
        state: z.string(),
        cla_total_m2: num,
        balance_front_pct: num,
      }),
    ),
    next: z.string().nullable(),
  })
  .meta({ id: "SessionList" });

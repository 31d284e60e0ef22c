/**
 * Analysis sessions (one analysed log each) and their per-speed-band results, shaped for the
 * upload and Compare work. A session names the exact setup version it ran on; that reference is
 * what makes a setup version immutable (see app/db/schema/garage.ts).
 */
import { double, index, int, mysqlEnum, mysqlTable, primaryKey, timestamp, varchar } from "drizzle-orm/mysql-core";
import { organization, user } from "./auth";
import { cars, jsonText, setups } from "./garage";

export const SESSION_STATUSES = ["received", "read", "checked", "flagged"] as const;
export type SessionStatus = (typeof SESSION_STATUSES)[number];

export const analysisSessions = mysqlTable(
  "analysis_sessions",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    carId: varchar("car_id", { length: 36 })
      .notNull()
      .references(() => cars.id, { onDelete: "restrict" }),
    // restrict: a setup version that produced numbers cannot disappear under them.
    setupId: varchar("setup_id", { length: 36 })
      .notNull()
      .references(() => setups.id, { onDelete: "restrict" }),
    name: varchar("name", { length: 120 }).notNull(),
    recordedAt: timestamp("recorded_at", { fsp: 3 }),
    status: mysqlEnum("status", SESSION_STATUSES).notNull().default("received"),
    summaryVersion: int("summary_version"),
    summary: jsonText<unknown>()("summary"),
    createdBy: varchar("created_by", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
  },
  (t) => [
    index("analysis_sessions_team_id_idx").on(t.teamId),
    index("analysis_sessions_car_id_idx").on(t.carId),
    index("analysis_sessions_setup_id_idx").on(t.setupId),
  ],
);

/** One row per speed band of a session's summary (the CLI's `bands` array), for Compare queries. */
export const sessionBands = mysqlTable(
  "session_bands",
  {
    sessionId: varchar("session_id", { length: 36 })
      .notNull()
      .references(() => analysisSessions.id, { onDelete: "cascade" }),
    minKmh: double("min_kmh").notNull(),
    maxKmh: double("max_kmh").notNull(),
    samples: int("samples").notNull(),
    aeroSamples: int("aero_samples").notNull().default(0),
    aeroLoadFrontN: double("aero_load_front_n"),
    aeroLoadRearN: double("aero_load_rear_n"),
    balanceFrontPct: double("balance_front_pct"),
    // 95 % intervals from block means (summary bands), so Compare can tell a change from noise.
    balanceFrontCi95LoPct: double("balance_front_ci95_lo_pct"),
    balanceFrontCi95HiPct: double("balance_front_ci95_hi_pct"),
    understeerGradientDegPerG: double("understeer_gradient_deg_per_g"),
    understeerCi95LoDegPerG: double("understeer_ci95_lo_deg_per_g"),
    understeerCi95HiDegPerG: double("understeer_ci95_hi_deg_per_g"),
    understeerSamples: int("understeer_samples").notNull().default(0),
  },
  (t) => [primaryKey({ columns: [t.sessionId, t.minKmh] })],
);

export type AnalysisSession = typeof analysisSessions.$inferSelect;
export type NewAnalysisSession = typeof analysisSessions.$inferInsert;
export type SessionBand = typeof sessionBands.$inferSelect;
export type NewSessionBand = typeof sessionBands.$inferInsert;

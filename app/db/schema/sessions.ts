/**
 * Analysis sessions (one analysed log each), their per-speed-band results, the history of every
 * analysis of their raw file, and what the Drop a log flow needs around them: staged raw uploads,
 * the team's venues and its Logger profiles (saved Channel maps).
 *
 * A session names the exact setup version it ran on; that reference is what makes a setup version
 * immutable (see app/db/schema/garage.ts). `summary` is the summary of record (the server's run of
 * the engine on the stored raw file; the CLI's JSON, without chart traces, which live in `traces`).
 */
import { bigint, char, date, double, index, int, mysqlEnum, mysqlTable, primaryKey, text, timestamp, uniqueIndex, varchar } from "drizzle-orm/mysql-core";
import { organization, user } from "./auth";
import { cars, jsonText, setups } from "./garage";

/** received → read (the browser's summary) → checked (the server agrees) or flagged (it differs, or warnings need a look). */
export const SESSION_STATUSES = ["received", "read", "checked", "flagged"] as const;
export type SessionStatus = (typeof SESSION_STATUSES)[number];

/** Where a session came from: the Drop a log page, the headless API, or the demo seed. */
export const SESSION_SOURCES = ["browser", "api", "seed"] as const;
export type SessionSource = (typeof SESSION_SOURCES)[number];

/** How the air density of a session was set: readings typed in, ISA at the venue's altitude, or ISA at sea level. */
export const AIR_SOURCES = ["given", "venue_altitude", "isa_sea_level"] as const;
export type AirSource = (typeof AIR_SOURCES)[number];

/** A team's list of venues (circuits, hill-climbs, test days), with the altitude for ISA air. */
export const venues = mysqlTable(
  "venues",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 80 }).notNull(),
    /** Geopotential altitude of the paddock (m); ISA at that altitude stands in for missing weather. */
    altitudeM: double("altitude_m"),
    notes: varchar("notes", { length: 200 }),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("venues_team_name_idx").on(t.teamId, t.name)],
);

/**
 * A raw export stored by the upload route before (and after) it becomes a session. `stored` = complete
 * and hashed, waiting for the session form; `attached` = a session owns it; uploads never attached
 * are swept after a day. An interrupted upload never gets a row (its partial file is never visible).
 */
export const rawUploads = mysqlTable(
  "raw_uploads",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    userId: varchar("user_id", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    storage: varchar("storage", { length: 8, enum: ["fs", "s3"] }).notNull(),
    storageKey: varchar("storage_key", { length: 300 }).notNull(),
    fileName: varchar("file_name", { length: 255 }).notNull(),
    sha256: char("sha256", { length: 64 }).notNull(),
    bytes: bigint("bytes", { mode: "number" }).notNull(),
    status: mysqlEnum("status", ["stored", "attached"]).notNull().default("stored"),
    sessionId: varchar("session_id", { length: 36 }),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
  },
  (t) => [index("raw_uploads_team_sha_idx").on(t.teamId, t.sha256), index("raw_uploads_status_idx").on(t.status, t.createdAt)],
);

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

    // Session details (Drop a log form, or the API's meta).
    sessionDate: date("session_date", { mode: "string" }),
    venueId: varchar("venue_id", { length: 36 }).references(() => venues.id, { onDelete: "set null" }),
    runLabel: varchar("run_label", { length: 80 }),
    /** A team member, or a name typed in (guest drivers). */
    driverUserId: varchar("driver_user_id", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    driverName: varchar("driver_name", { length: 120 }),
    airTempC: double("air_temp_c"),
    airPressureHpa: double("air_pressure_hpa"),
    airHumidityPct: double("air_humidity_pct"),
    airSource: varchar("air_source", { length: 16, enum: AIR_SOURCES }),
    fuelStartL: double("fuel_start_l"),
    fuelEndL: double("fuel_end_l"),
    fuelDensityKgPerL: double("fuel_density_kg_per_l"),
    tyreNotes: text("tyre_notes"),
    notes: text("notes"),
    source: varchar("source", { length: 8, enum: SESSION_SOURCES }).notNull().default("browser"),

    // The raw file (see storage.server.ts); the same file twice in one team is one session.
    rawUploadId: varchar("raw_upload_id", { length: 36 }),
    rawFileName: varchar("raw_file_name", { length: 255 }),
    rawSha256: char("raw_sha256", { length: 64 }),
    rawBytes: bigint("raw_bytes", { mode: "number" }),

    // How it was analysed: the confirmed Channel map, the engine options, the engine that made `summary`.
    channelMap: jsonText<unknown>()("channel_map"),
    analysisOptions: jsonText<unknown>()("analysis_options"),
    engineVersion: varchar("engine_version", { length: 40 }),
    /** Decimated chart traces of the summary of record (kept apart: the summary is the CLI's JSON). */
    traces: jsonText<unknown>()("traces"),
    /** The browser's summary as uploaded, and how the server's re-check compared with it. */
    browserSummary: jsonText<unknown>()("browser_summary"),
    recheckDiff: jsonText<unknown>()("recheck_diff"),
    /** Why the status is what it is, in a sentence (e.g. what the server could not read). */
    statusDetail: text("status_detail"),
    checkedAt: timestamp("checked_at", { fsp: 3 }),
    updatedAt: timestamp("updated_at", { fsp: 3 }).notNull().defaultNow(),
  },
  (t) => [
    index("analysis_sessions_team_id_idx").on(t.teamId),
    index("analysis_sessions_car_id_idx").on(t.carId),
    index("analysis_sessions_setup_id_idx").on(t.setupId),
    index("analysis_sessions_team_date_idx").on(t.teamId, t.sessionDate),
    uniqueIndex("analysis_sessions_team_sha_idx").on(t.teamId, t.rawSha256),
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

/**
 * Every analysis of a session's raw file, oldest first: the browser's at upload, each server run
 * (the re-check, a re-analysis after a car or setup correction or a new engine) with its engine and
 * summary version, and how it differed from the browser's.
 */
export const sessionResults = mysqlTable(
  "session_results",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    sessionId: varchar("session_id", { length: 36 })
      .notNull()
      .references(() => analysisSessions.id, { onDelete: "cascade" }),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    origin: varchar("origin", { length: 8, enum: ["browser", "server"] }).notNull(),
    reason: varchar("reason", { length: 16, enum: ["upload", "api", "recheck", "reanalysis", "seed"] }).notNull(),
    engineVersion: varchar("engine_version", { length: 40 }),
    summaryVersion: int("summary_version"),
    setupId: varchar("setup_id", { length: 36 }),
    summary: jsonText<unknown>()("summary"),
    options: jsonText<unknown>()("options"),
    /** Against the browser's summary (server runs only): the figures that differ beyond rounding. */
    diff: jsonText<unknown>()("diff"),
    error: text("error"),
    jobId: bigint("job_id", { mode: "number" }),
    createdBy: varchar("created_by", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
  },
  (t) => [index("session_results_session_idx").on(t.sessionId, t.createdAt)],
);

/** A confirmed Channel map saved under a name; the one whose header matches is proposed first. */
export const loggerProfiles = mysqlTable(
  "logger_profiles",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 80 }).notNull(),
    /** SHA-256 of the header's column names in order (see app/lib/sessions/logger-profile.ts). */
    headerSignature: char("header_signature", { length: 64 }).notNull(),
    columns: jsonText<string[]>()("columns").notNull(),
    map: jsonText<unknown>()("map").notNull(),
    createdBy: varchar("created_by", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
    lastUsedAt: timestamp("last_used_at", { fsp: 3 }),
  },
  (t) => [uniqueIndex("logger_profiles_team_name_idx").on(t.teamId, t.name), index("logger_profiles_team_sig_idx").on(t.teamId, t.headerSignature)],
);

export type Venue = typeof venues.$inferSelect;
export type RawUpload = typeof rawUploads.$inferSelect;
export type AnalysisSession = typeof analysisSessions.$inferSelect;
export type NewAnalysisSession = typeof analysisSessions.$inferInsert;
export type SessionBand = typeof sessionBands.$inferSelect;
export type NewSessionBand = typeof sessionBands.$inferInsert;
export type SessionResult = typeof sessionResults.$inferSelect;
export type LoggerProfile = typeof loggerProfiles.$inferSelect;

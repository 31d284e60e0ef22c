/**
 * Garage: cars, setup sheets and their versions. Stored units are the engine's: mm, kg, N/mm (at the
 * damper), L, deg. Motion ratio = damper travel / wheel travel. Bump-stop gap = damper travel from
 * static to contact. A setup row is one version; a version referenced by an analysis session is
 * never changed in place (app/server/garage-setups.server.ts enforces this), and a version or car a session used is
 * archived rather than deleted (app/server/garage-delete.server.ts).
 */
import { boolean, customType, double, index, int, mysqlTable, text, timestamp, uniqueIndex, varchar } from "drizzle-orm/mysql-core";
import { organization, user } from "./auth";
import type { BumpStopPoint } from "../../lib/garage/bump-stop";

/** JSON kept as text: MariaDB hands JSON columns back as strings, so parse on the way out. */
export const jsonText = <T>() =>
  customType<{ data: T; driverData: string }>({
    dataType: () => "longtext",
    toDriver: (value) => JSON.stringify(value),
    fromDriver: (value) => (typeof value === "string" ? (JSON.parse(value) as T) : (value as T)),
  });

const bumpTable = jsonText<BumpStopPoint[]>();

export const cars = mysqlTable(
  "cars",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 80 }).notNull(),
    category: varchar("category", { length: 60 }),
    wheelbaseMm: double("wheelbase_mm").notNull(),
    trackFrontMm: double("track_front_mm"),
    trackRearMm: double("track_rear_mm"),
    cogHeightMm: double("cog_height_mm").notNull(),
    steeringRatio: double("steering_ratio").notNull(),
    tyreVerticalStiffnessNPerMm: double("tyre_vertical_stiffness_n_per_mm"),
    fuelTankFromFrontAxleMm: double("fuel_tank_from_front_axle_mm"),
    fuelDensityKgPerL: double("fuel_density_kg_per_l").notNull().default(0.745),
    cornerFlKg: double("corner_fl_kg"),
    cornerFrKg: double("corner_fr_kg"),
    cornerRlKg: double("corner_rl_kg"),
    cornerRrKg: double("corner_rr_kg"),
    weighedWithDriver: boolean("weighed_with_driver").notNull().default(false),
    weighedFuelL: double("weighed_fuel_l"),
    /** From the corner weights when they are given, else as stated (e.g. an imported car file). */
    massKg: double("mass_kg").notNull(),
    staticFrontWeightPct: double("static_front_weight_pct").notNull(),
    notes: text("notes"),
    /** Set when a car that sessions used is deleted: it leaves the Garage lists, and its sessions keep it. */
    archivedAt: timestamp("archived_at", { fsp: 3 }),
    createdBy: varchar("created_by", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { fsp: 3 }).notNull().defaultNow(),
  },
  (t) => [index("cars_team_id_idx").on(t.teamId)],
);

/** A named line of setup versions for one car ("Kestrel Bank dry"). */
export const setupSheets = mysqlTable(
  "setup_sheets",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    carId: varchar("car_id", { length: 36 })
      .notNull()
      .references(() => cars.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 80 }).notNull(),
    createdBy: varchar("created_by", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
  },
  (t) => [index("setup_sheets_team_id_idx").on(t.teamId), index("setup_sheets_car_id_idx").on(t.carId)],
);

/** One version of a setup sheet. */
export const setups = mysqlTable(
  "setups",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    sheetId: varchar("sheet_id", { length: 36 })
      .notNull()
      .references(() => setupSheets.id, { onDelete: "cascade" }),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    carId: varchar("car_id", { length: 36 })
      .notNull()
      .references(() => cars.id, { onDelete: "cascade" }),
    version: int("version").notNull(),
    frontSpringRateNPerMm: double("front_spring_rate_n_per_mm").notNull(),
    rearSpringRateNPerMm: double("rear_spring_rate_n_per_mm").notNull(),
    frontMotionRatio: double("front_motion_ratio").notNull(),
    rearMotionRatio: double("rear_motion_ratio").notNull(),
    frontBumpStopKind: varchar("front_bump_stop_kind", { length: 8, enum: ["none", "linear", "table"] }).notNull().default("none"),
    frontBumpStopGapMm: double("front_bump_stop_gap_mm"),
    frontBumpStopRateNPerMm: double("front_bump_stop_rate_n_per_mm"),
    frontBumpStopTable: bumpTable("front_bump_stop_table"),
    rearBumpStopKind: varchar("rear_bump_stop_kind", { length: 8, enum: ["none", "linear", "table"] }).notNull().default("none"),
    rearBumpStopGapMm: double("rear_bump_stop_gap_mm"),
    rearBumpStopRateNPerMm: double("rear_bump_stop_rate_n_per_mm"),
    rearBumpStopTable: bumpTable("rear_bump_stop_table"),
    staticDamperFlMm: double("static_damper_fl_mm"),
    staticDamperFrMm: double("static_damper_fr_mm"),
    staticDamperRlMm: double("static_damper_rl_mm"),
    staticDamperRrMm: double("static_damper_rr_mm"),
    rideHeightFrontMm: double("ride_height_front_mm"),
    rideHeightRearMm: double("ride_height_rear_mm"),
    arbFront: varchar("arb_front", { length: 60 }),
    arbRear: varchar("arb_rear", { length: 60 }),
    rearWingAngleDeg: double("rear_wing_angle_deg"),
    rearWingStep: varchar("rear_wing_step", { length: 40 }),
    frontAero: varchar("front_aero", { length: 120 }),
    aeroNotes: text("aero_notes"),
    notes: text("notes"),
    changeNote: varchar("change_note", { length: 200 }),
    /** Set when a version that sessions used is deleted: it is archived (kept for them), never removed. */
    archivedAt: timestamp("archived_at", { fsp: 3 }),
    createdBy: varchar("created_by", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { fsp: 3 }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex("setups_sheet_version_idx").on(t.sheetId, t.version),
    index("setups_team_id_idx").on(t.teamId),
    index("setups_car_id_idx").on(t.carId),
  ],
);

export type Car = typeof cars.$inferSelect;
export type NewCar = typeof cars.$inferInsert;
export type SetupSheet = typeof setupSheets.$inferSelect;
export type Setup = typeof setups.$inferSelect;
export type NewSetup = typeof setups.$inferInsert;

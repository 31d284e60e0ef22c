/**
 * Notes engineers and analysts leave on a session or one of its speed bands (shown in the Balance
 * report and in Compare), and comparisons saved under a name.
 */
import { double, index, mysqlTable, timestamp, uniqueIndex, varchar } from "drizzle-orm/mysql-core";
import { organization, user } from "./auth";
import { jsonText } from "./garage";
import { analysisSessions } from "./sessions";

export const sessionAnnotations = mysqlTable(
  "session_annotations",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    sessionId: varchar("session_id", { length: 36 })
      .notNull()
      .references(() => analysisSessions.id, { onDelete: "cascade" }),
    /** The band's edges (km/h); both null = a note on the whole session. */
    bandMinKmh: double("band_min_kmh"),
    bandMaxKmh: double("band_max_kmh"),
    body: varchar("body", { length: 500 }).notNull(),
    createdBy: varchar("created_by", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
  },
  (t) => [index("session_annotations_session_idx").on(t.sessionId, t.createdAt), index("session_annotations_team_idx").on(t.teamId)],
);

export const savedComparisons = mysqlTable(
  "saved_comparisons",
  {
    id: varchar("id", { length: 36 }).primaryKey(),
    teamId: varchar("team_id", { length: 36 })
      .notNull()
      .references(() => organization.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 80 }).notNull(),
    /** Session ids in order; the first is the baseline. */
    sessionIds: jsonText<string[]>()("session_ids").notNull(),
    createdBy: varchar("created_by", { length: 36 }).references(() => user.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { fsp: 3 }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("saved_comparisons_team_name_idx").on(t.teamId, t.name)],
);

export type SessionAnnotation = typeof sessionAnnotations.$inferSelect;
export type SavedComparison = typeof savedComparisons.$inferSelect;

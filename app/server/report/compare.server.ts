/**
 * Compare: several sessions of one team side by side, each against the first (the baseline), with
 * the setup fields that changed between their setup versions.
 */
import { and, desc, eq, gte, inArray, lte, type SQL } from "drizzle-orm";
import { db } from "~/server/db.server";
import { analysisSessions, venues } from "~/db/schema/sessions";
import { cars, setups, setupSheets } from "~/db/schema/garage";
import { compareSessions } from "~/engine/compare";
import { diffSetups } from "~/lib/garage/diff";
import { changeSentences, loadAtStandardAir, STANDARD_DENSITY_KG_M3, type CompareBand } from "~/lib/report/compare";
import { getSessionReports, sessionJson } from "./session.server";
import { adviceFor } from "~/lib/report/advice";

export const MAX_COMPARED = 8;

export class CompareInputError extends Error {
  constructor(
    message: string,
    readonly status: 400 | 404,
  ) {
    super(message);
  }
}

/** The comparison of `ids` (2 to 8, the first is the baseline); throws CompareInputError for bad or foreign ids. */
export async function compareReport(teamId: string, ids: string[], urlOf: (id: string) => string) {
  const unique = [...new Set(ids)];
  if (unique.length < 2) throw new CompareInputError("Name at least two sessions: ids=<id>,<id>.", 400);
  if (unique.length > MAX_COMPARED) throw new CompareInputError(`Compare at most ${MAX_COMPARED} sessions at once.`, 400);
  const reports = await getSessionReports(teamId, unique);
  if (reports.length !== unique.length) {
    const found = new Set(reports.map((r) => r.head.id));
    throw new CompareInputError(`No such session in this team: ${unique.filter((id) => !found.has(id)).join(", ")}.`, 404);
  }
  const unread = reports.filter((r) => !r.summary);
  if (unread.length) throw new CompareInputError(`Not read yet, nothing to compare: ${unread.map((r) => r.head.name).join(", ")}.`, 400);
  const setupRows = await db.select().from(setups).where(and(eq(setups.teamId, teamId), inArray(setups.id, [...new Set(reports.map((r) => r.head.setup.id))])));
  const setupById = new Map(setupRows.map((s) => [s.id, s]));
  const sessions = reports.map(({ head, summary }) => {
    const s = summary!;
    const bands: CompareBand[] = s.bands.map((b) => ({
      min_kmh: b.min_kmh,
      max_kmh: b.max_kmh,
      mean_speed_kmh: b.mean_speed_kmh,
      balance_front_pct: b.balance_front_pct,
      balance_front_ci95_pct: b.balance_front_ci95_pct,
      understeer_gradient_deg_per_g: b.understeer_gradient_deg_per_g,
      understeer_ci95_deg_per_g: b.understeer_ci95_deg_per_g,
      aero_load_front_n_std_air: loadAtStandardAir(b.aero_load_front_n, s.air_density_kg_m3),
      aero_load_rear_n_std_air: loadAtStandardAir(b.aero_load_rear_n, s.air_density_kg_m3),
    }));
    return {
      ...sessionJson(head, urlOf(head.id)),
      air_density_kg_m3: s.air_density_kg_m3,
      cla_front_m2: s.aero.cla_front_m2,
      cla_rear_m2: s.aero.cla_rear_m2,
      cla_total_m2: s.aero.cla_total_m2,
      balance_front_pct: s.aero.balance_front_pct,
      balance_front_ci95_pct: s.aero.balance_front_ci95_pct,
      balance_shift: s.aero.balance_shift,
      advice: adviceFor(s),
      bands,
    };
  });
  const [base, ...rest] = reports;
  const differences = rest.map((r) => {
    const comparison = compareSessions(base.summary!, r.summary!);
    const a = setupById.get(base.head.setup.id);
    const b = setupById.get(r.head.setup.id);
    const setupChanges = a && b ? diffSetups(a, b, "metric") : [];
    return { id: r.head.id, against: base.head.id, comparison, setup_changes: setupChanges, sentences: changeSentences(setupChanges, comparison) };
  });
  const densities = new Set(sessions.map((s) => s.air_density_kg_m3));
  return {
    baseline: base.head.id,
    standard_density_kg_m3: STANDARD_DENSITY_KG_M3,
    densities_differ: densities.size > 1,
    sessions,
    differences,
  };
}

export interface PickerFilters {
  car?: string;
  from?: string;
  to?: string;
  venue?: string;
}

/** Sessions to pick from, newest first, filtered by car, date range and venue. */
export async function pickableSessions(teamId: string, f: PickerFilters, limit = 100) {
  const where: SQL[] = [eq(analysisSessions.teamId, teamId)];
  if (f.car) where.push(eq(analysisSessions.carId, f.car));
  if (f.venue) where.push(eq(analysisSessions.venueId, f.venue));
  if (f.from) where.push(gte(analysisSessions.sessionDate, f.from));
  if (f.to) where.push(lte(analysisSessions.sessionDate, f.to));
  return db
    .select({
      id: analysisSessions.id,
      name: analysisSessions.name,
      date: analysisSessions.sessionDate,
      run: analysisSessions.runLabel,
      status: analysisSessions.status,
      car: cars.name,
      setup: setupSheets.name,
      setupVersion: setups.version,
      venue: venues.name,
      airTempC: analysisSessions.airTempC,
    })
    .from(analysisSessions)
    .innerJoin(cars, eq(cars.id, analysisSessions.carId))
    .innerJoin(setups, eq(setups.id, analysisSessions.setupId))
    .innerJoin(setupSheets, eq(setupSheets.id, setups.sheetId))
    .leftJoin(venues, eq(venues.id, analysisSessions.venueId))
    .where(and(...where))
    .orderBy(desc(analysisSessions.sessionDate), desc(analysisSessions.createdAt))
    .limit(limit);
}

/** The team's cars and venues for the picker's filters. */
export async function pickerChoices(teamId: string) {
  const [carRows, venueRows] = await Promise.all([
    db.select({ id: cars.id, name: cars.name }).from(cars).where(eq(cars.teamId, teamId)).orderBy(cars.name),
    db.select({ id: venues.id, name: venues.name }).from(venues).where(eq(venues.teamId, teamId)).orderBy(venues.name),
  ]);
  return { cars: carRows, venues: venueRows };
}

/**
 * Demo sessions for the invented scenario: eight stints of Harrowgate Motor Club's two cars over three
 * days, simulated by the demo generator (sample-data/), written as logger exports, stored in raw-file
 * storage and analysed by the server through the same ingest code as an upload (storeSessionOfRecord).
 *   - Sat 16 May, Kestrel Bank, mild: Marlin SR2 on setup v1 (rear wing 6°) twice, Vesper GT4-R once;
 *   - Sun 17 May, Kestrel Bank, same weather: the Marlin on v2 (rear wing 9°, stiffer rear spring) twice,
 *     the Vesper again: the wing change Compare can show;
 *   - Sat 23 May, Coldwater Ridge hill-climb, cold and at altitude: one timed run of each car.
 * Small logs (three laps at 50 Hz, well under 1 MB each) keep `npm start` quick. Idempotent: a stint
 * already seeded (same date and run label) is skipped before it is simulated.
 */
import { Readable } from "node:stream";
import { and, asc, eq } from "drizzle-orm";
import { member, organization, user } from "../../db/schema/auth";
import { cars, setupSheets, setups } from "../../db/schema/garage";
import { analysisSessions, venues } from "../../db/schema/sessions";
import { analyseLog } from "../../engine/analyse";
import { DEFAULT_BAND_EDGES_KMH } from "../../engine/bands";
import { validateCar } from "../../engine/car";
import { sessionAirDensity } from "../../engine/density";
import { engineOptionsOf, type SessionDetails } from "../../lib/sessions/details";
import { encodeChunks, writeExport } from "../../../sample-data/export-writer";
import { exportColumns, LOGS, mapFor, type LogSpec } from "../../../sample-data/generate";
import { COLDWATER_RIDGE, KESTREL_BANK, MARLIN_SR2, VESPER_GT4R } from "../../../sample-data/scenario";
import { simulateStint, type SimCar } from "../../../sample-data/sim";
import { db } from "../db.server";
import { exportCarInput } from "../garage-io.server";
import { serverEngineVersion } from "../ingest/recheck.server";
import { storeSessionOfRecord } from "../ingest/store.server";
import { deleteObject, getStream, putStream } from "../storage.server";
import { DEMO_TEAM } from "./users.server";

const VENUES = [
  { name: KESTREL_BANK.name, altitudeM: 85, notes: "3.1 km circuit: two hairpins, fast sweepers" },
  { name: COLDWATER_RIDGE.name, altitudeM: 420, notes: "1.9 km hill-climb; altitude of the start line" },
];

/** The Marlin on setup v2: more rear wing (6° → 9°) and a stiffer rear spring, as the seeded setup sheet says. */
const MARLIN_V2: SimCar = { ...MARLIN_SR2, claRearM2: 0.86, rear: { ...MARLIN_SR2.rear, springNPerMm: 135 } };

type Plan = {
  date: string;
  run: string;
  car: "Marlin SR2" | "Vesper GT4-R";
  setupVersion: number;
  sim: SimCar;
  dialectOf: string;
  track: typeof KESTREL_BANK;
  laps: number;
  seed: number;
  venue: string;
  air: { temp_c: number; pressure_hpa: number; humidity_pct: number };
  fuelStartL?: number;
  notes?: string;
  tyreNotes?: string;
};

const MILD = { temp_c: 17, pressure_hpa: 1012, humidity_pct: 60 };
const HILL_COLD = { temp_c: 6, pressure_hpa: 962, humidity_pct: 80 };

export const DEMO_SESSION_PLANS: Plan[] = [
  { date: "2026-05-16", run: "Practice 1", car: "Marlin SR2", setupVersion: 1, sim: MARLIN_SR2, dialectOf: "marlin-kestrel-comma.csv", track: KESTREL_BANK, laps: 3, seed: 501, venue: KESTREL_BANK.name, air: MILD, fuelStartL: 40, tyreNotes: "Used set, 2 heat cycles" },
  { date: "2026-05-16", run: "Practice 2", car: "Marlin SR2", setupVersion: 1, sim: MARLIN_SR2, dialectOf: "marlin-kestrel-comma.csv", track: KESTREL_BANK, laps: 3, seed: 502, venue: KESTREL_BANK.name, air: MILD, fuelStartL: 35 },
  { date: "2026-05-16", run: "Practice 1", car: "Vesper GT4-R", setupVersion: 1, sim: VESPER_GT4R, dialectOf: "vesper-kestrel-tab.csv", track: KESTREL_BANK, laps: 3, seed: 511, venue: KESTREL_BANK.name, air: MILD },
  { date: "2026-05-17", run: "Qualifying", car: "Marlin SR2", setupVersion: 2, sim: MARLIN_V2, dialectOf: "marlin-kestrel-comma.csv", track: KESTREL_BANK, laps: 3, seed: 521, venue: KESTREL_BANK.name, air: MILD, fuelStartL: 30, notes: "First run with 9° of rear wing" },
  { date: "2026-05-17", run: "Race 1", car: "Marlin SR2", setupVersion: 2, sim: MARLIN_V2, dialectOf: "marlin-kestrel-comma.csv", track: KESTREL_BANK, laps: 3, seed: 522, venue: KESTREL_BANK.name, air: MILD, fuelStartL: 45 },
  { date: "2026-05-17", run: "Race 1", car: "Vesper GT4-R", setupVersion: 1, sim: VESPER_GT4R, dialectOf: "vesper-kestrel-tab.csv", track: KESTREL_BANK, laps: 3, seed: 531, venue: KESTREL_BANK.name, air: MILD },
  { date: "2026-05-23", run: "Timed run 1", car: "Marlin SR2", setupVersion: 2, sim: MARLIN_V2, dialectOf: "vesper-coldwater-comma.csv", track: COLDWATER_RIDGE, laps: 1, seed: 541, venue: COLDWATER_RIDGE.name, air: HILL_COLD, notes: "Cold, damp air at the start line" },
  { date: "2026-05-23", run: "Timed run 1", car: "Vesper GT4-R", setupVersion: 1, sim: VESPER_GT4R, dialectOf: "vesper-coldwater-comma.csv", track: COLDWATER_RIDGE, laps: 1, seed: 551, venue: COLDWATER_RIDGE.name, air: HILL_COLD },
];

const FUEL_DENSITY = 0.745;

async function ensureVenues(teamId: string): Promise<Map<string, string>> {
  const ids = new Map<string, string>();
  for (const v of VENUES) {
    const [row] = await db.select({ id: venues.id }).from(venues).where(and(eq(venues.teamId, teamId), eq(venues.name, v.name)));
    if (row) ids.set(v.name, row.id);
    else {
      const id = crypto.randomUUID();
      await db.insert(venues).values({ id, teamId, name: v.name, altitudeM: v.altitudeM, notes: v.notes, createdAt: new Date() });
      ids.set(v.name, id);
    }
  }
  return ids;
}

async function setupVersionId(teamId: string, carId: string, version: number): Promise<string | null> {
  const [row] = await db
    .select({ id: setups.id })
    .from(setups)
    .innerJoin(setupSheets, eq(setupSheets.id, setups.sheetId))
    .where(and(eq(setups.teamId, teamId), eq(setups.carId, carId), eq(setups.version, version)))
    .orderBy(asc(setupSheets.createdAt))
    .limit(1);
  return row?.id ?? null;
}

/** Seeds the demo sessions; returns how many were added. */
export async function seedSessions(): Promise<number> {
  const [team] = await db.select({ id: organization.id, slug: organization.slug }).from(organization).where(eq(organization.slug, DEMO_TEAM.slug)).limit(1);
  if (!team) return 0;
  const [driver] = await db
    .select({ id: user.id })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(and(eq(member.organizationId, team.id), eq(member.role, "driver")))
    .limit(1);
  const [owner] = await db.select({ id: member.userId }).from(member).where(and(eq(member.organizationId, team.id), eq(member.role, "owner"))).limit(1);
  const venueIds = await ensureVenues(team.id);
  let added = 0;
  for (const plan of DEMO_SESSION_PLANS) {
    const [car] = await db.select({ id: cars.id, fuelDensityKgPerL: cars.fuelDensityKgPerL }).from(cars).where(and(eq(cars.teamId, team.id), eq(cars.name, plan.car)));
    if (!car) continue;
    const setupId = await setupVersionId(team.id, car.id, plan.setupVersion);
    if (!setupId) continue;
    const [seeded] = await db
      .select({ id: analysisSessions.id })
      .from(analysisSessions)
      .where(and(eq(analysisSessions.teamId, team.id), eq(analysisSessions.carId, car.id), eq(analysisSessions.sessionDate, plan.date), eq(analysisSessions.runLabel, plan.run)))
      .limit(1);
    if (seeded) continue;
    if (await seedOne(team, plan, { carId: car.id, setupId, venueId: venueIds.get(plan.venue)!, driverUserId: driver?.id, ownerId: owner?.id ?? null, carFuelDensity: car.fuelDensityKgPerL ?? FUEL_DENSITY })) added++;
  }
  return added;
}

async function seedOne(
  team: { id: string; slug: string },
  plan: Plan,
  ids: { carId: string; setupId: string; venueId: string; driverUserId?: string; ownerId: string | null; carFuelDensity: number },
): Promise<boolean> {
  const like = LOGS.find((l) => l.file === plan.dialectOf)!;
  const spec: LogSpec = {
    ...like,
    car: plan.sim,
    track: plan.track,
    laps: plan.laps,
    rateHz: 50,
    seed: plan.seed,
    metadata: Object.keys(like.metadata).length ? { Club: "Harrowgate Motor Club", Venue: plan.venue, Car: plan.car, Session: plan.run } : {},
  };
  const density = sessionAirDensity(plan.air.temp_c, plan.air.pressure_hpa, plan.air.humidity_pct).density_kg_m3;
  const { columns, truth } = simulateStint(spec.car, spec.track, { laps: spec.laps, rateHz: spec.rateHz, seed: spec.seed, airDensityKgM3: density, bandEdgesKmh: [...DEFAULT_BAND_EDGES_KMH], ...spec.sim });
  const fileName = `${plan.date}-${plan.car.toLowerCase().replace(/[^a-z0-9]+/g, "-")}-${plan.run.toLowerCase().replace(/[^a-z0-9]+/g, "-")}.csv`;
  const raw = await putStream(Readable.from(encodeChunks(writeExport(exportColumns(spec, columns), spec.metadata, spec.dialect))), { keyPrefix: `teams/${team.id}` });
  let stored = false;
  try {
    const fuel = plan.fuelStartL !== undefined ? { start: plan.fuelStartL, end: Math.round((plan.fuelStartL - truth.fuel_burnt_kg / ids.carFuelDensity) * 10) / 10 } : undefined;
    const details: SessionDetails = {
      carId: ids.carId,
      setupId: ids.setupId,
      date: plan.date,
      venueId: ids.venueId,
      run: plan.run,
      driverUserId: ids.driverUserId,
      air: plan.air,
      fuel_l: fuel,
      tyreNotes: plan.tyreNotes,
      notes: plan.notes,
    };
    const map = mapFor(spec);
    const options = engineOptionsOf(details, { venueAltitudeM: null, carFuelDensityKgPerL: ids.carFuelDensity });
    const { car } = await exportCarInput(team.id, ids.carId, ids.setupId);
    const summary = await analyseLog(await getStream(raw.storage, raw.key), validateCar(car), map, options);
    const { traces, ...cli } = summary;
    const result = await storeSessionOfRecord({
      teamId: team.id,
      teamSlug: team.slug,
      userId: ids.ownerId,
      source: "seed",
      raw: { ...raw, fileName },
      details,
      map,
      options,
      summary: cli,
      traces,
      engineVersion: serverEngineVersion(summary),
      origin: "server",
      enqueueCheck: false,
      createdAt: new Date(`${plan.date}T12:00:00Z`),
    });
    stored = result.ok && !result.duplicate;
    return stored;
  } finally {
    if (!stored) await deleteObject(raw.storage, raw.key).catch(() => undefined);
  }
}

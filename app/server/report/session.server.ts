/**
 * Reading one session for the Balance report and the data API: the session row with its car, setup
 * version, venue and driver names, scoped to the team (another team's id is "not found").
 */
import { and, eq, inArray, sql } from "drizzle-orm";
import { data } from "react-router";
import { alias } from "drizzle-orm/mysql-core";
import { db } from "~/server/db.server";
import { analysisSessions, venues } from "~/db/schema/sessions";
import { cars, setupSheets, setups } from "~/db/schema/garage";
import { user } from "~/db/schema/auth";
import type { SessionSummary } from "~/engine/summary-types";
import type { SessionStatus } from "~/db/schema/sessions";

const driver = alias(user, "driver");

export interface SessionHead {
  id: string;
  name: string;
  status: SessionStatus;
  statusDetail: string | null;
  sessionDate: string | null;
  recordedAt: Date | null;
  createdAt: Date;
  updatedAt: Date;
  checkedAt: Date | null;
  runLabel: string | null;
  venueId: string | null;
  venueName: string | null;
  driverName: string | null;
  car: { id: string; name: string };
  setup: { id: string; sheetId: string; sheetName: string; version: number; changeNote: string | null };
  air: { tempC: number | null; pressureHpa: number | null; humidityPct: number | null; source: string | null };
  fuel: { startL: number | null; endL: number | null; densityKgPerL: number | null };
  tyreNotes: string | null;
  notes: string | null;
  source: string;
  rawFileName: string | null;
  rawBytes: number | null;
  engineVersion: string | null;
  recheckDiff: unknown;
  summaryVersion: number | null;
}

const headColumns = {
  id: analysisSessions.id,
  name: analysisSessions.name,
  status: analysisSessions.status,
  statusDetail: analysisSessions.statusDetail,
  sessionDate: analysisSessions.sessionDate,
  recordedAt: analysisSessions.recordedAt,
  createdAt: analysisSessions.createdAt,
  updatedAt: analysisSessions.updatedAt,
  checkedAt: analysisSessions.checkedAt,
  runLabel: analysisSessions.runLabel,
  venueId: analysisSessions.venueId,
  venueName: venues.name,
  driverUserName: driver.name,
  driverName: analysisSessions.driverName,
  carId: cars.id,
  carName: cars.name,
  setupId: setups.id,
  sheetId: setups.sheetId,
  sheetName: setupSheets.name,
  setupVersion: setups.version,
  changeNote: setups.changeNote,
  airTempC: analysisSessions.airTempC,
  airPressureHpa: analysisSessions.airPressureHpa,
  airHumidityPct: analysisSessions.airHumidityPct,
  airSource: analysisSessions.airSource,
  fuelStartL: analysisSessions.fuelStartL,
  fuelEndL: analysisSessions.fuelEndL,
  fuelDensityKgPerL: analysisSessions.fuelDensityKgPerL,
  tyreNotes: analysisSessions.tyreNotes,
  notes: analysisSessions.notes,
  source: analysisSessions.source,
  rawFileName: analysisSessions.rawFileName,
  rawBytes: analysisSessions.rawBytes,
  engineVersion: analysisSessions.engineVersion,
  recheckDiff: analysisSessions.recheckDiff,
  summaryVersion: analysisSessions.summaryVersion,
};

type HeadRow = { [K in keyof typeof headColumns]: (typeof headColumns)[K]["_"]["data"] | null };

function headOf(r: HeadRow): SessionHead {
  return {
    id: r.id!,
    name: r.name!,
    status: r.status!,
    statusDetail: r.statusDetail,
    sessionDate: r.sessionDate,
    recordedAt: r.recordedAt,
    createdAt: r.createdAt!,
    updatedAt: r.updatedAt!,
    checkedAt: r.checkedAt,
    runLabel: r.runLabel,
    venueId: r.venueId,
    venueName: r.venueName,
    driverName: r.driverUserName ?? r.driverName,
    car: { id: r.carId!, name: r.carName! },
    setup: { id: r.setupId!, sheetId: r.sheetId!, sheetName: r.sheetName!, version: r.setupVersion!, changeNote: r.changeNote },
    air: { tempC: r.airTempC, pressureHpa: r.airPressureHpa, humidityPct: r.airHumidityPct, source: r.airSource },
    fuel: { startL: r.fuelStartL, endL: r.fuelEndL, densityKgPerL: r.fuelDensityKgPerL },
    tyreNotes: r.tyreNotes,
    notes: r.notes,
    source: r.source!,
    rawFileName: r.rawFileName,
    rawBytes: r.rawBytes,
    engineVersion: r.engineVersion,
    recheckDiff: r.recheckDiff,
    summaryVersion: r.summaryVersion,
  };
}

function baseQuery() {
  return db
    .select({ ...headColumns, summary: analysisSessions.summary })
    .from(analysisSessions)
    .innerJoin(cars, eq(cars.id, analysisSessions.carId))
    .innerJoin(setups, eq(setups.id, analysisSessions.setupId))
    .innerJoin(setupSheets, eq(setupSheets.id, setups.sheetId))
    .leftJoin(venues, eq(venues.id, analysisSessions.venueId))
    .leftJoin(driver, eq(driver.id, analysisSessions.driverUserId));
}

const NOT_FOUND = "No such session in this team.";

/** Pages get React Router's data() (their error boundary); API routes a JSON body. */
function notFound(api: boolean | undefined): never {
  if (api) throw Response.json({ error: NOT_FOUND }, { status: 404 });
  throw data(NOT_FOUND, { status: 404 });
}

type VersionFields = { updatedAt: Date; checkedAt: Date | null; status: string };
const versionString = (r: VersionFields) => `${r.updatedAt.getTime()}:${r.checkedAt?.getTime() ?? ""}:${r.status}`;

// The data API's hot reads are prepared once per process (the SQL is built once; only the ids change).
let versionQuery: ReturnType<typeof prepareVersionQuery> | undefined;
function prepareVersionQuery() {
  return db
    .select({ updatedAt: analysisSessions.updatedAt, checkedAt: analysisSessions.checkedAt, status: analysisSessions.status })
    .from(analysisSessions)
    .where(and(eq(analysisSessions.teamId, sql.placeholder("teamId")), eq(analysisSessions.id, sql.placeholder("sessionId"))))
    .limit(1)
    .prepare();
}

/** The session's last change (for ETags), or a thrown 404. */
export async function sessionVersion(teamId: string, sessionId: string, api = true) {
  const rows = await (versionQuery ??= prepareVersionQuery()).execute({ teamId, sessionId });
  if (!rows[0]) notFound(api);
  return versionString(rows[0]);
}

let apiQuery: ReturnType<typeof prepareApiQuery> | undefined;
function prepareApiQuery() {
  return db
    // The summary as the stored JSON text: the data API passes it through without parsing and re-serialising it.
    .select({ ...headColumns, summaryText: sql<string | null>`${analysisSessions.summary}` })
    .from(analysisSessions)
    .innerJoin(cars, eq(cars.id, analysisSessions.carId))
    .innerJoin(setups, eq(setups.id, analysisSessions.setupId))
    .innerJoin(setupSheets, eq(setupSheets.id, setups.sheetId))
    .leftJoin(venues, eq(venues.id, analysisSessions.venueId))
    .leftJoin(driver, eq(driver.id, analysisSessions.driverUserId))
    .where(and(eq(analysisSessions.teamId, sql.placeholder("teamId")), eq(analysisSessions.id, sql.placeholder("sessionId"))))
    .limit(1)
    .prepare();
}

/**
 * A summary of record's stored text, when it is one (summaryOf's test on the text: an object with bands,
 * aero and car), else null. The stored text is what JSON.stringify wrote, so it is valid JSON as it stands.
 */
export function summaryTextOf(text: string | null): string | null {
  if (!text || text.charCodeAt(0) !== 123 /* { */) return null;
  return text.includes('"bands":[') && text.includes('"aero":{') && text.includes('"car":{') ? text : null;
}

/** The session's details, its version (for the ETag) and its summary of record as JSON text. Throws a JSON 404. */
export async function getSessionForApi(teamId: string, sessionId: string) {
  const rows = await (apiQuery ??= prepareApiQuery()).execute({ teamId, sessionId });
  const row = rows[0];
  if (!row) notFound(true);
  const { summaryText, ...head } = row;
  return { head: headOf(head as HeadRow), version: versionString(row as VersionFields), summaryText: summaryTextOf(summaryText) };
}

/** A summary of record is present once the engine has read the log; until then the page says so. */
export function summaryOf(value: unknown): SessionSummary | null {
  if (!value || typeof value !== "object") return null;
  const s = value as SessionSummary;
  return Array.isArray(s.bands) && s.aero && s.car ? s : null;
}

/** The session's details and summary of record (no traces). Throws 404 for an unknown or other team's id. */
export async function getSessionReport(teamId: string, sessionId: string, opts: { api?: boolean } = {}) {
  const rows = await baseQuery()
    .where(and(eq(analysisSessions.teamId, teamId), eq(analysisSessions.id, sessionId)))
    .limit(1);
  const row = rows[0];
  if (!row) notFound(opts.api);
  const { summary, ...head } = row;
  return { head: headOf(head as HeadRow), summary: summaryOf(summary) };
}

/** Several sessions of one team (Compare); unknown ids are left out, the caller decides what that means. */
export async function getSessionReports(teamId: string, sessionIds: string[]) {
  if (sessionIds.length === 0) return [];
  const rows = await baseQuery().where(and(eq(analysisSessions.teamId, teamId), inArray(analysisSessions.id, sessionIds)));
  const byId = new Map(rows.map((r) => [r.id, r]));
  return sessionIds.flatMap((id) => {
    const r = byId.get(id);
    if (!r) return [];
    const { summary, ...head } = r;
    return [{ head: headOf(head as HeadRow), summary: summaryOf(summary) }];
  });
}

/** The decimated traces of a session's summary of record, or null. Throws 404 like getSessionReport. */
export async function getSessionTraces(teamId: string, sessionId: string, opts: { api?: boolean } = {}) {
  const rows = await db
    .select({ traces: analysisSessions.traces, updatedAt: analysisSessions.updatedAt })
    .from(analysisSessions)
    .where(and(eq(analysisSessions.teamId, teamId), eq(analysisSessions.id, sessionId)))
    .limit(1);
  if (!rows[0]) notFound(opts.api);
  return rows[0];
}

/** A session's details as the data API gives them (snake_case, like the summary). */
export function sessionJson(head: SessionHead, url: string) {
  return {
    id: head.id,
    url,
    name: head.name,
    date: head.sessionDate,
    venue: head.venueName,
    car: { id: head.car.id, name: head.car.name },
    setup: { id: head.setup.id, sheet: head.setup.sheetName, version: head.setup.version },
    driver: head.driverName,
    run: head.runLabel,
    state: head.status,
    state_detail: head.statusDetail,
    checked_at: head.checkedAt ? new Date(head.checkedAt).toISOString() : null,
    engine_version: head.engineVersion,
    summary_version: head.summaryVersion,
    air: { temp_c: head.air.tempC, pressure_hpa: head.air.pressureHpa, humidity_pct: head.air.humidityPct, source: head.air.source },
    fuel_l: head.fuel.startL === null && head.fuel.endL === null ? null : { start: head.fuel.startL, end: head.fuel.endL },
    tyre_notes: head.tyreNotes,
    notes: head.notes,
  };
}

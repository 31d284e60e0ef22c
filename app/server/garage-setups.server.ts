/**
 * Setup sheets and their versions. The rule: a stored version is never changed in place. Saving an
 * edit writes the next version (number + 1) and leaves the one edited as it was, so the history keeps
 * every value a setup ever had (and a version a session used is exactly what that session ran).
 */
import { randomUUID } from "node:crypto";
import { data } from "react-router";
import { and, asc, count, desc, eq, inArray, isNull, like, max } from "drizzle-orm";
import { setupSheets, setups, type NewSetup, type Setup } from "../db/schema/garage";
import { analysisSessions } from "../db/schema/sessions";
import { user } from "../db/schema/auth";
import type { SetupFormValues } from "../lib/garage/schemas";
import { diffSetups, summariseDiff } from "../lib/garage/diff";
import type { UnitSystem } from "../lib/garage/units";
import { db } from "./db.server";
import { getCar } from "./garage-cars.server";
import { recordAudit } from "./audit.server";

/** The columns a setup form writes (everything but identity, version and authorship). */
export type SetupValues = Omit<NewSetup, "id" | "sheetId" | "teamId" | "carId" | "version" | "archivedAt" | "createdBy" | "createdAt" | "updatedAt">;

export function setupRowValues(values: SetupFormValues): { sheetName: string; values: SetupValues } {
  const { name, ...rest } = values;
  for (const axle of ["front", "rear"] as const) {
    const kind = rest[`${axle}BumpStopKind`];
    if (kind === "none") {
      rest[`${axle}BumpStopGapMm`] = null;
      rest[`${axle}BumpStopRateNPerMm`] = null;
      rest[`${axle}BumpStopTable`] = null;
    } else if (kind === "linear") rest[`${axle}BumpStopTable`] = null;
    else rest[`${axle}BumpStopRateNPerMm`] = null;
  }
  return { sheetName: name, values: rest };
}

export const SETUP_SORTS = ["name", "version", "updated"] as const;
export type SetupSort = (typeof SETUP_SORTS)[number];

/** Setup sheets of a car with their latest version that is not archived (a sheet with every version archived is left out). */
export async function listSetupSheets(teamId: string, carId: string, query: { q?: string; sort?: SetupSort; dir?: "asc" | "desc" } = {}) {
  const latest = db
    .select({ sheetId: setups.sheetId, version: max(setups.version).as("latest_version"), versions: count().as("versions") })
    .from(setups)
    .where(and(eq(setups.teamId, teamId), eq(setups.carId, carId), isNull(setups.archivedAt)))
    .groupBy(setups.sheetId)
    .as("latest");
  const filters = [eq(setupSheets.teamId, teamId), eq(setupSheets.carId, carId)];
  if (query.q) filters.push(like(setupSheets.name, `%${query.q.replace(/[\\%_]/g, (c) => "\\" + c)}%`));
  const column = { name: setupSheets.name, version: latest.version, updated: setups.updatedAt }[query.sort ?? "updated"];
  const rows = await db
    .select({
      sheetId: setupSheets.id,
      name: setupSheets.name,
      latestVersion: latest.version,
      versions: latest.versions,
      setupId: setups.id,
      updatedAt: setups.updatedAt,
      rearWingAngleDeg: setups.rearWingAngleDeg,
      rearWingStep: setups.rearWingStep,
      frontSpringRateNPerMm: setups.frontSpringRateNPerMm,
      rearSpringRateNPerMm: setups.rearSpringRateNPerMm,
      authorName: user.name,
    })
    .from(setupSheets)
    .innerJoin(latest, eq(latest.sheetId, setupSheets.id))
    .innerJoin(setups, and(eq(setups.sheetId, setupSheets.id), eq(setups.version, latest.version)))
    .leftJoin(user, eq(user.id, setups.createdBy))
    .where(and(...filters))
    .orderBy(query.dir === "asc" ? asc(column) : desc(column), asc(setupSheets.id));
  const used = await usageCounts(rows.map((r) => r.setupId));
  return rows.map((r) => ({ ...r, sessions: used.get(r.setupId) ?? 0 }));
}

async function usageCounts(setupIds: string[]): Promise<Map<string, number>> {
  if (setupIds.length === 0) return new Map();
  const rows = await db
    .select({ setupId: analysisSessions.setupId, n: count() })
    .from(analysisSessions)
    .where(inArray(analysisSessions.setupId, setupIds))
    .groupBy(analysisSessions.setupId);
  return new Map(rows.map((r) => [r.setupId, Number(r.n)]));
}

/** One version with its sheet, or a thrown 404 when it is not this team's (or not this car's). */
export async function getSetup(teamId: string, carId: string, setupId: string) {
  const [row] = await db
    .select({ setup: setups, sheetName: setupSheets.name, authorName: user.name })
    .from(setups)
    .innerJoin(setupSheets, eq(setupSheets.id, setups.sheetId))
    .leftJoin(user, eq(user.id, setups.createdBy))
    .where(and(eq(setups.teamId, teamId), eq(setups.carId, carId), eq(setups.id, setupId)))
    .limit(1);
  if (!row) throw data("No such setup for this car.", { status: 404 });
  const sessions = (await usageCounts([setupId])).get(setupId) ?? 0;
  return { ...row.setup, sheetName: row.sheetName, authorName: row.authorName, sessions };
}

export async function isSetupUsed(setupId: string): Promise<boolean> {
  return ((await usageCounts([setupId])).get(setupId) ?? 0) > 0;
}

/** Every version of a sheet, newest first, each with what changed from the one before. */
export async function setupHistory(teamId: string, sheetId: string, units: UnitSystem = "metric") {
  const rows = await db
    .select({ setup: setups, authorName: user.name })
    .from(setups)
    .leftJoin(user, eq(user.id, setups.createdBy))
    .where(and(eq(setups.teamId, teamId), eq(setups.sheetId, sheetId)))
    .orderBy(asc(setups.version));
  const used = await usageCounts(rows.map((r) => r.setup.id));
  const history = rows.map((r, i) => ({
    id: r.setup.id,
    version: r.setup.version,
    createdAt: r.setup.createdAt,
    updatedAt: r.setup.updatedAt,
    authorName: r.authorName,
    changeNote: r.setup.changeNote,
    archived: r.setup.archivedAt !== null,
    sessions: used.get(r.setup.id) ?? 0,
    change: i === 0 ? "first version" : summariseDiff(diffSetups(rows[i - 1].setup, r.setup, units)),
  }));
  return history.reverse();
}

export async function createSetupSheet(
  teamId: string,
  userId: string | null,
  carId: string,
  sheetName: string,
  values: SetupValues,
): Promise<{ sheetId: string; setupId: string }> {
  await getCar(teamId, carId);
  const sheetId = randomUUID();
  const setupId = randomUUID();
  const now = new Date();
  await db.transaction(async (tx) => {
    await tx.insert(setupSheets).values({ id: sheetId, teamId, carId, name: sheetName, createdBy: userId, createdAt: now });
    await tx.insert(setups).values({ ...values, id: setupId, sheetId, teamId, carId, version: 1, createdBy: userId, createdAt: now, updatedAt: now });
    await recordAudit(tx, { teamId, actorUserId: userId, action: "setup_version_created", subjectType: "setup", subjectId: setupId, detail: { setup: sheetName, version: 1 } });
  });
  return { sheetId, setupId };
}

export type SaveOutcome = { setupId: string; version: number; newVersion: boolean; reason: "saved" | "unchanged" };

/**
 * Saves an edit of version `setupId` as the next version of its sheet: no version is ever changed in
 * place, so every earlier value stays in the history. A save that changes nothing (no field differs and the
 * change note is empty) writes nothing. Rows are locked (sheet, then version) so two saves at the same
 * moment get consecutive numbers. The audit log records the new version in the same transaction.
 */
export async function saveSetupEdit(input: {
  teamId: string;
  userId: string | null;
  carId: string;
  setupId: string;
  sheetName: string;
  values: SetupValues;
}): Promise<SaveOutcome> {
  const current = await getSetup(input.teamId, input.carId, input.setupId);
  if (current.archivedAt) throw data("This setup version is archived (kept for the sessions that used it) and cannot be edited.", { status: 409 });
  return db.transaction(async (tx) => {
    await tx.select({ id: setupSheets.id }).from(setupSheets).where(eq(setupSheets.id, current.sheetId)).for("update");
    await tx.select({ id: setups.id }).from(setups).where(eq(setups.id, current.id)).for("update");
    const renamed = input.sheetName !== current.sheetName;
    if (renamed) await tx.update(setupSheets).set({ name: input.sheetName }).where(eq(setupSheets.id, current.sheetId));
    const unchanged = diffSetups(current, { ...current, ...input.values } as Setup, "metric").length === 0 && !input.values.changeNote;
    if (unchanged) return { setupId: current.id, version: current.version, newVersion: false, reason: "unchanged" as const };
    const now = new Date();
    const [top] = await tx.select({ v: max(setups.version) }).from(setups).where(eq(setups.sheetId, current.sheetId));
    const version = Number(top?.v ?? 0) + 1;
    const id = randomUUID();
    await tx.insert(setups).values({
      ...input.values,
      id,
      sheetId: current.sheetId,
      teamId: input.teamId,
      carId: input.carId,
      version,
      createdBy: input.userId,
      createdAt: now,
      updatedAt: now,
    });
    await recordAudit(tx, {
      teamId: input.teamId,
      actorUserId: input.userId,
      action: "setup_version_created",
      subjectType: "setup",
      subjectId: id,
      detail: { setup: input.sheetName, version, from: current.version, ...(renamed ? { renamedFrom: current.sheetName } : {}) },
    });
    return { setupId: id, version, newVersion: true, reason: "saved" as const };
  });
}

/** A new sheet "<name> (copy)" starting at version 1 with the values of `setupId`, on `targetCarId`. */
export async function duplicateSetup(teamId: string, userId: string | null, carId: string, setupId: string, targetCarId = carId) {
  const source = await getSetup(teamId, carId, setupId);
  const values = setupValuesOf(source);
  values.changeNote = `Copied from ${source.sheetName} v${source.version}`;
  const name = source.sheetName.length > 73 ? source.sheetName.slice(0, 73) : source.sheetName;
  return createSetupSheet(teamId, userId, targetCarId, `${name} (copy)`, values);
}

/** The form columns of a stored version. */
export function setupValuesOf(row: Setup & { sheetName?: unknown; authorName?: unknown; sessions?: unknown }): SetupValues {
  const { id: _i, sheetId: _s, teamId: _t, carId: _c, version: _v, archivedAt: _ar, createdBy: _b, createdAt: _a, updatedAt: _u, ...rest } = row;
  const { sheetName: _n, authorName: _an, sessions: _se, ...values } = rest;
  return values;
}

/** Latest version id of each sheet of a car (for export pickers). */
export async function latestSetupIds(teamId: string, carId: string): Promise<string[]> {
  const rows = await listSetupSheets(teamId, carId);
  return rows.map((r) => r.setupId);
}


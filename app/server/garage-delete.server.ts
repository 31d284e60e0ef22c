/**
 * Deleting Garage data. What a session used is archived, never deleted: the session must keep showing
 * exactly the car and setup version it ran. Everything else goes for good. Each change and its audit event
 * are one transaction; rows are locked first so a session recorded at the same moment cannot slip in
 * between the check and the delete (it then waits, and finds the row archived or gone).
 */
import { and, count, eq, isNull } from "drizzle-orm";
import { data } from "react-router";
import { cars, setupSheets, setups } from "../db/schema/garage";
import { analysisSessions } from "../db/schema/sessions";
import { recordAudit } from "./audit.server";
import { db } from "./db.server";

export type DeleteOutcome = { archived: boolean; sessions: number };

/** Deletes one setup version, or archives it when sessions used it. The sheet goes with its last version. */
export async function deleteSetupVersion(teamId: string, userId: string | null, carId: string, setupId: string): Promise<DeleteOutcome> {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .select({ id: setups.id, sheetId: setups.sheetId, version: setups.version, archivedAt: setups.archivedAt, sheetName: setupSheets.name })
      .from(setups)
      .innerJoin(setupSheets, eq(setupSheets.id, setups.sheetId))
      .where(and(eq(setups.teamId, teamId), eq(setups.carId, carId), eq(setups.id, setupId)))
      .for("update");
    if (!row) throw data("No such setup for this car.", { status: 404 });
    const [usage] = await tx.select({ n: count() }).from(analysisSessions).where(eq(analysisSessions.setupId, setupId));
    const sessions = Number(usage?.n ?? 0);
    const detail = { setup: row.sheetName, version: row.version, sessions };
    if (sessions > 0) {
      if (!row.archivedAt) await tx.update(setups).set({ archivedAt: new Date() }).where(eq(setups.id, setupId));
      await recordAudit(tx, { teamId, actorUserId: userId, action: "setup_archived", subjectType: "setup", subjectId: setupId, detail });
      return { archived: true, sessions };
    }
    await tx.delete(setups).where(eq(setups.id, setupId));
    const [left] = await tx.select({ n: count() }).from(setups).where(eq(setups.sheetId, row.sheetId));
    if (Number(left?.n ?? 0) === 0) await tx.delete(setupSheets).where(eq(setupSheets.id, row.sheetId));
    await recordAudit(tx, { teamId, actorUserId: userId, action: "setup_deleted", subjectType: "setup", subjectId: setupId, detail });
    return { archived: false, sessions: 0 };
  });
}

/**
 * Deletes a car with its setup sheets and versions; when sessions used the car it is archived instead (with
 * every version), so those sessions keep their car and setup.
 */
export async function deleteCar(teamId: string, userId: string | null, carId: string): Promise<DeleteOutcome> {
  return db.transaction(async (tx) => {
    const [car] = await tx.select({ id: cars.id, name: cars.name }).from(cars).where(and(eq(cars.teamId, teamId), eq(cars.id, carId))).for("update");
    if (!car) throw data("No such car in this team.", { status: 404 });
    const [usage] = await tx.select({ n: count() }).from(analysisSessions).where(eq(analysisSessions.carId, carId));
    const sessions = Number(usage?.n ?? 0);
    if (sessions > 0) {
      const now = new Date();
      await tx.update(cars).set({ archivedAt: now }).where(and(eq(cars.id, carId), isNull(cars.archivedAt)));
      await tx.update(setups).set({ archivedAt: now }).where(and(eq(setups.carId, carId), isNull(setups.archivedAt)));
      await recordAudit(tx, { teamId, actorUserId: userId, action: "car_archived", subjectType: "car", subjectId: carId, detail: { car: car.name, sessions } });
      return { archived: true, sessions };
    }
    // Versions and sheets go by the foreign keys' cascade.
    await tx.delete(cars).where(eq(cars.id, carId));
    await recordAudit(tx, { teamId, actorUserId: userId, action: "car_deleted", subjectType: "car", subjectId: carId, detail: { car: car.name } });
    return { archived: false, sessions: 0 };
  });
}

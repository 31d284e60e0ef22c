// Deleting Garage data (issue 12 item 3): a confirmation is needed, only the owner may, what a session used
// is archived and never deleted, and each deletion leaves an audit event. Against the real MariaDB.
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import { db } from "~/server/db.server";
import { cars, setupSheets, setups } from "~/db/schema/garage";
import { analysisSessions } from "~/db/schema/sessions";
import { auditLog } from "~/db/schema/audit";
import * as carRoute from "~/routes/garage/car";
import * as setupRoute from "~/routes/garage/setup";
import { createCar, listCars } from "~/server/garage-cars.server";
import { createSetupSheet, listSetupSheets, saveSetupEdit } from "~/server/garage-setups.server";
import { args, formRequest, outcome } from "./auth-support";
import { baseSetupValues, garageWorld, type Who } from "./garage-support";

type World = Awaited<ReturnType<typeof garageWorld>>;
let w: World;
beforeAll(async () => {
  w = await garageWorld();
});

async function carWithTwoVersions() {
  const carId = await createCar(w.team.id, w.userIds.owner, {
    name: `Delete me ${randomUUID().slice(0, 6)}`, wheelbaseMm: 2450, cogHeightMm: 400, steeringRatio: 12, fuelDensityKgPerL: 0.745, massKg: 620, staticFrontWeightPct: 44,
  });
  const v1 = await createSetupSheet(w.team.id, w.userIds.owner, carId, "Sheet", baseSetupValues);
  const v2 = await saveSetupEdit({ teamId: w.team.id, userId: w.userIds.owner, carId, setupId: v1.setupId, sheetName: "Sheet", values: { ...baseSetupValues, rearWingAngleDeg: 10, changeNote: null } });
  return { carId, sheetId: v1.sheetId, v1: v1.setupId, v2: v2.setupId };
}

async function sessionUsing(carId: string, setupId: string) {
  await db.insert(analysisSessions).values({ id: randomUUID(), teamId: w.team.id, carId, setupId, name: "Kestrel Bank, stint 2", status: "checked", createdBy: w.userIds.engineer });
}

function deleteSetup(who: Who, carId: string, setupId: string, fields: Record<string, string> = { intent: "delete-setup", confirm: "yes" }) {
  const team = who === "outsider" ? w.outsider.teamSlug : w.team.slug;
  const path = `/t/${team}/garage/${carId}/setups/${setupId}`;
  return outcome(() => setupRoute.action(args(formRequest(path, fields, w.jars[who]), { teamSlug: team, carId, setupId })));
}

function deleteCarAs(who: Who, carId: string, fields: Record<string, string> = { intent: "delete-car", confirm: "yes" }) {
  const path = `/t/${w.team.slug}/garage/${carId}`;
  return outcome(() => carRoute.action(args(formRequest(path, fields, w.jars[who]), { teamSlug: w.team.slug, carId })));
}

async function events(subjectId: string) {
  const rows = await db.select().from(auditLog).where(and(eq(auditLog.teamId, w.team.id), eq(auditLog.subjectId, subjectId)));
  return rows.map((r) => r.action).sort();
}

describe("deleting setup versions", () => {
  it("without the confirmation box nothing is deleted (400)", async () => {
    const world = await carWithTwoVersions();
    const refused = await deleteSetup("owner", world.carId, world.v2, { intent: "delete-setup" });
    // RFC 9110 §15.5.1: 400 for a request the server will not process as sent.
    expect(refused.status).toBe(400);
    expect(await db.select().from(setups).where(eq(setups.id, world.v2))).toHaveLength(1);
  });

  it.each([["engineer", 403], ["analyst", 403], ["driver", 403], ["outsider", 404]] as const)("%s may not delete (%i) and nothing changes", async (who, status) => {
    const world = await carWithTwoVersions();
    const refused = await deleteSetup(who, world.carId, world.v2);
    expect(refused.status).toBe(status);
    expect(await db.select().from(setups).where(eq(setups.id, world.v2))).toHaveLength(1);
  });

  it("an unused version is deleted; the sheet stays while a version is left and goes with the last", async () => {
    const world = await carWithTwoVersions();
    const first = await deleteSetup("owner", world.carId, world.v2);
    expect(first.status).toBe(302);
    expect(first.location).toBe(`/t/${w.team.slug}/garage/${world.carId}?deleted=${world.v2}`);
    expect(await db.select().from(setups).where(eq(setups.id, world.v2))).toHaveLength(0);
    expect(await db.select().from(setupSheets).where(eq(setupSheets.id, world.sheetId))).toHaveLength(1);
    await deleteSetup("owner", world.carId, world.v1);
    expect(await db.select().from(setupSheets).where(eq(setupSheets.id, world.sheetId))).toHaveLength(0);
    expect(await events(world.v2)).toEqual(["setup_deleted", "setup_version_created"]);
    console.log("tried: owner deletes both versions of a sheet nobody used; held: rows gone, sheet gone with the last, audit events kept");
  });

  it("a version a session used is archived, unchanged, and the list falls back to the version before", async () => {
    const world = await carWithTwoVersions();
    await sessionUsing(world.carId, world.v2);
    const [before] = await db.select().from(setups).where(eq(setups.id, world.v2));
    const done = await deleteSetup("owner", world.carId, world.v2);
    expect(done.location).toContain("?archived=");
    const [after] = await db.select().from(setups).where(eq(setups.id, world.v2));
    expect(after.archivedAt).not.toBeNull();
    expect({ ...after, archivedAt: null }).toEqual(before);
    const sheets = await listSetupSheets(w.team.id, world.carId);
    expect(sheets.map((s) => [s.setupId, s.latestVersion])).toEqual([[world.v1, 1]]);
    expect(await events(world.v2)).toEqual(["setup_archived", "setup_version_created"]);
    // An archived version cannot be edited (a new version of it would hide that it was archived).
    await expect(saveSetupEdit({ teamId: w.team.id, userId: w.userIds.owner, carId: world.carId, setupId: world.v2, sheetName: "Sheet", values: { ...baseSetupValues, changeNote: "x" } })).rejects.toMatchObject({ init: { status: 409 } });
    console.log("tried: owner deletes a version a session used; held: archived with every value as it was, never removed");
  });
});

describe("deleting cars", () => {
  it("without the confirmation box, or as an engineer, nothing is deleted", async () => {
    const world = await carWithTwoVersions();
    expect((await deleteCarAs("owner", world.carId, { intent: "delete-car" })).status).toBe(400);
    expect((await deleteCarAs("engineer", world.carId)).status).toBe(403);
    expect(await db.select().from(cars).where(eq(cars.id, world.carId))).toHaveLength(1);
  });

  it("a car no session used goes with its sheets and versions", async () => {
    const world = await carWithTwoVersions();
    const done = await deleteCarAs("owner", world.carId);
    expect(done.status).toBe(302);
    expect(done.location).toBe(`/t/${w.team.slug}/garage?deleted=${world.carId}`);
    expect(await db.select().from(cars).where(eq(cars.id, world.carId))).toHaveLength(0);
    expect(await db.select().from(setups).where(eq(setups.carId, world.carId))).toHaveLength(0);
    expect(await events(world.carId)).toEqual(["car_created", "car_deleted"]);
  });

  it("a car a session used is archived with its versions: out of the Garage list, still there for the session", async () => {
    const world = await carWithTwoVersions();
    await sessionUsing(world.carId, world.v1);
    const done = await deleteCarAs("owner", world.carId);
    expect(done.location).toBe(`/t/${w.team.slug}/garage?archived=${world.carId}`);
    const [car] = await db.select().from(cars).where(eq(cars.id, world.carId));
    expect(car.archivedAt).not.toBeNull();
    expect((await db.select().from(setups).where(eq(setups.carId, world.carId))).every((s) => s.archivedAt !== null)).toBe(true);
    expect((await listCars(w.team.id)).some((c) => c.id === world.carId)).toBe(false);
    expect(await events(world.carId)).toEqual(["car_archived", "car_created"]);
    console.log("tried: owner deletes a car a session used; held: archived, hidden from the list, rows kept");
  });
});

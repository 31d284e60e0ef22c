/**
 * Garage cars: every query is scoped to the team; a car of another team is answered with 404.
 */
import { randomUUID } from "node:crypto";
import { data } from "react-router";
import { z } from "zod";
import { and, asc, count, desc, eq, isNull, like, or, sql, type SQL } from "drizzle-orm";
import { cars, setupSheets, setups, type Car, type NewCar } from "../db/schema/garage";
import { user } from "../db/schema/auth";
import { summariseCornerWeights } from "../lib/garage/corner-weights";
import type { CarFormValues } from "../lib/garage/schemas";
import { db } from "./db.server";
import { recordAudit } from "./audit.server";

export const CAR_SORTS = ["name", "category", "mass", "wheelbase", "updated"] as const;
export type CarSort = (typeof CAR_SORTS)[number];

/** Filters and sort of a car list, from searchParams: the Garage page and GET /api/t/:teamSlug/cars share it. */
export const carListSearchSchema = z.object({
  q: z.string().trim().max(80).optional().catch(undefined),
  category: z.string().trim().max(60).optional().catch(undefined),
  sort: z.enum(CAR_SORTS).optional().catch(undefined),
  dir: z.enum(["asc", "desc"]).optional().catch(undefined),
});

export interface CarListQuery {
  q?: string;
  category?: string;
  sort?: CarSort;
  dir?: "asc" | "desc";
}

const SORT_COLUMN = {
  name: cars.name,
  category: cars.category,
  mass: cars.massKg,
  wheelbase: cars.wheelbaseMm,
  updated: cars.updatedAt,
} as const;

type TeamKey = string | ReturnType<typeof sql.placeholder>;

/**
 * The team's live cars with their setup-sheet counts, filtered by `extra` and not yet ordered: the Garage
 * list and the dashboard's prepared query (where `teamId` is a placeholder) share it.
 */
export function liveCarsQuery(teamId: TeamKey, extra: SQL[] = []) {
  const setupCount = db
    .select({ carId: setupSheets.carId, sheets: count().as("sheets") })
    .from(setupSheets)
    .where(eq(setupSheets.teamId, teamId))
    .groupBy(setupSheets.carId)
    .as("setup_count");
  return db
    .select({
      id: cars.id,
      name: cars.name,
      category: cars.category,
      massKg: cars.massKg,
      staticFrontWeightPct: cars.staticFrontWeightPct,
      wheelbaseMm: cars.wheelbaseMm,
      updatedAt: cars.updatedAt,
      setupSheets: sql<number>`coalesce(${setupCount.sheets}, 0)`.mapWith(Number),
    })
    .from(cars)
    .leftJoin(setupCount, eq(setupCount.carId, cars.id))
    .where(and(eq(cars.teamId, teamId), isNull(cars.archivedAt), ...extra));
}

/** The team's cars that are not archived (an archived car stays only for the sessions that used it). */
export async function listCars(teamId: string, query: CarListQuery = {}) {
  const filters: SQL[] = [];
  if (query.q) {
    const pattern = `%${query.q.replace(/[\\%_]/g, (c) => "\\" + c)}%`;
    filters.push(or(like(cars.name, pattern), like(cars.category, pattern))!);
  }
  if (query.category) filters.push(eq(cars.category, query.category));
  const column = SORT_COLUMN[query.sort ?? "name"];
  const order = query.dir === "desc" ? desc(column) : asc(column);
  return liveCarsQuery(teamId, filters).orderBy(order, asc(cars.id));
}

export async function listCategories(teamId: string): Promise<string[]> {
  const rows = await db
    .selectDistinct({ category: cars.category })
    .from(cars)
    .where(and(eq(cars.teamId, teamId), sql`${cars.category} is not null`))
    .orderBy(asc(cars.category));
  return rows.map((r) => r.category!).filter(Boolean);
}

/** The car, or a thrown 404 when it does not exist in this team. */
export async function getCar(teamId: string, carId: string): Promise<Car & { createdByName: string | null }> {
  const [row] = await db
    .select({ car: cars, createdByName: user.name })
    .from(cars)
    .leftJoin(user, eq(user.id, cars.createdBy))
    .where(and(eq(cars.teamId, teamId), eq(cars.id, carId)))
    .limit(1);
  if (!row) throw data("No such car in this team.", { status: 404 });
  return { ...row.car, createdByName: row.createdByName };
}

/** Row values from validated form values: mass and front % come from the corner weights when given. */
export function carRowValues(values: CarFormValues): Omit<NewCar, "id" | "teamId" | "createdBy"> {
  const { cornerFlKg: fl, cornerFrKg: fr, cornerRlKg: rl, cornerRrKg: rr } = values;
  const corners = fl !== null && fr !== null && rl !== null && rr !== null ? summariseCornerWeights({ fl, fr, rl, rr }) : null;
  return {
    name: values.name,
    category: values.category,
    wheelbaseMm: values.wheelbaseMm,
    trackFrontMm: values.trackFrontMm,
    trackRearMm: values.trackRearMm,
    cogHeightMm: values.cogHeightMm,
    steeringRatio: values.steeringRatio,
    tyreVerticalStiffnessNPerMm: values.tyreVerticalStiffnessNPerMm,
    fuelTankFromFrontAxleMm: values.fuelTankFromFrontAxleMm,
    fuelDensityKgPerL: values.fuelDensityKgPerL,
    cornerFlKg: fl,
    cornerFrKg: fr,
    cornerRlKg: rl,
    cornerRrKg: rr,
    weighedWithDriver: values.weighedWithDriver,
    weighedFuelL: values.weighedFuelL,
    massKg: corners ? corners.totalKg : values.massKg!,
    staticFrontWeightPct: corners ? corners.staticFrontPct : values.staticFrontWeightPct!,
    notes: values.notes,
  };
}

export async function createCar(teamId: string, userId: string | null, values: Omit<NewCar, "id" | "teamId" | "createdBy">): Promise<string> {
  const id = randomUUID();
  const now = new Date();
  await db.transaction(async (tx) => {
    await tx.insert(cars).values({ ...values, id, teamId, createdBy: userId, createdAt: now, updatedAt: now });
    await recordAudit(tx, { teamId, actorUserId: userId, action: "car_created", subjectType: "car", subjectId: id, detail: { car: values.name } });
  });
  return id;
}

export async function updateCar(teamId: string, carId: string, values: Omit<NewCar, "id" | "teamId" | "createdBy">, userId: string | null = null): Promise<void> {
  await getCar(teamId, carId);
  await db.transaction(async (tx) => {
    await tx
      .update(cars)
      .set({ ...values, updatedAt: new Date() })
      .where(and(eq(cars.teamId, teamId), eq(cars.id, carId)));
    await recordAudit(tx, { teamId, actorUserId: userId, action: "car_updated", subjectType: "car", subjectId: carId, detail: { car: values.name ?? null } });
  });
}

/** A copy of the car with the latest version of each of its setup sheets (as version 1). */
export async function duplicateCar(teamId: string, userId: string | null, carId: string): Promise<string> {
  const source = await getCar(teamId, carId);
  const { id: _id, teamId: _t, archivedAt: _ar, createdBy: _c, createdAt: _ca, updatedAt: _u, createdByName: _n, ...values } = source;
  const newId = await createCar(teamId, userId, { ...values, name: copyName(values.name) });
  const sheets = await db.select().from(setupSheets).where(and(eq(setupSheets.teamId, teamId), eq(setupSheets.carId, carId)));
  for (const sheet of sheets) {
    const [latest] = await db.select().from(setups).where(and(eq(setups.sheetId, sheet.id), isNull(setups.archivedAt))).orderBy(desc(setups.version)).limit(1);
    if (!latest) continue;
    const sheetId = randomUUID();
    const now = new Date();
    await db.insert(setupSheets).values({ id: sheetId, teamId, carId: newId, name: sheet.name, createdBy: userId, createdAt: now });
    const { id: _sid, sheetId: _sh, carId: _car, version: _v, archivedAt: _sar, createdBy: _cb, createdAt: _sca, updatedAt: _su, ...setupValues } = latest;
    await db.insert(setups).values({
      ...setupValues,
      id: randomUUID(),
      sheetId,
      teamId,
      carId: newId,
      version: 1,
      changeNote: `Copied from ${source.name}, ${sheet.name} v${latest.version}`,
      createdBy: userId,
      createdAt: now,
      updatedAt: now,
    });
  }
  return newId;
}

export function copyName(name: string): string {
  const suffix = " (copy)";
  return (name.length + suffix.length > 80 ? name.slice(0, 80 - suffix.length) : name) + suffix;
}

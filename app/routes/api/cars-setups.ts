// GET /api/cars/:carId/setups — every setup version of one car of the caller's team, oldest first.
import { and, asc, eq } from "drizzle-orm";
import { requireApiAccess } from "~/server/api-access.server";
import { db } from "~/server/db.server";
import { cars, setups, setupSheets } from "~/db/schema/garage";
import { apiError } from "~/server/report/api.server";
import type { Route } from "./+types/cars-setups";

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const access = await requireApiAccess(request, context, { permission: { setup: ["read"] } });
  const [car] = await db.select({ id: cars.id, name: cars.name }).from(cars).where(and(eq(cars.teamId, access.teamId), eq(cars.id, params.carId))).limit(1);
  if (!car) return apiError(404, "No such car in this team.");
  const rows = await db
    .select({ id: setups.id, sheetId: setups.sheetId, sheet: setupSheets.name, version: setups.version, changeNote: setups.changeNote, createdAt: setups.createdAt, archivedAt: setups.archivedAt })
    .from(setups)
    .innerJoin(setupSheets, eq(setupSheets.id, setups.sheetId))
    .where(and(eq(setups.teamId, access.teamId), eq(setups.carId, car.id)))
    .orderBy(asc(setupSheets.name), asc(setups.version));
  return Response.json(
    {
      car,
      setups: rows.map((r) => ({ id: r.id, sheet_id: r.sheetId, sheet: r.sheet, version: r.version, change_note: r.changeNote, created_at: r.createdAt.toISOString(), archived: r.archivedAt !== null })),
    },
    { headers: { "Cache-Control": "private, no-cache", Vary: "Authorization, Cookie" } },
  );
}

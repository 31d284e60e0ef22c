// GET /api/cars — the caller's team's cars (token or cookie).
import { requireApiAccess } from "~/server/api-access.server";
import { listCars } from "~/server/garage-cars.server";
import type { Route } from "./+types/cars-list";

export async function loader({ request, context }: Route.LoaderArgs) {
  const access = await requireApiAccess(request, context, { permission: { car: ["read"] } });
  const cars = await listCars(access.teamId);
  return Response.json(
    {
      cars: cars.map((c) => ({ id: c.id, name: c.name, category: c.category, wheelbase_mm: c.wheelbaseMm, mass_kg: c.massKg, static_front_weight_pct: c.staticFrontWeightPct, setup_sheets: c.setupSheets })),
    },
    { headers: { "Cache-Control": "private, no-cache", Vary: "Authorization, Cookie" } },
  );
}

// GET /api/t/:teamSlug/cars — the team's cars as JSON (same filters and sorts as the Garage page).
import { requireMember } from "~/server/permissions.server";
import { carListSearchSchema, listCars } from "~/server/garage-cars.server";
import { searchParamsOf } from "~/server/garage-routes.server";
import type { Route } from "./+types/cars";

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["read"] });
  const cars = await listCars(ctx.team.id, searchParamsOf(request, carListSearchSchema));
  return Response.json({ cars });
}

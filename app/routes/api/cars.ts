// GET /api/t/:teamSlug/cars — the team's cars as JSON (same filters and sorts as the Garage page).
import { z } from "zod";
import { requireMember } from "~/server/permissions.server";
import { CAR_SORTS, listCars } from "~/server/garage-cars.server";
import { searchParamsOf } from "~/server/garage-routes.server";
import type { Route } from "./+types/cars";

const searchSchema = z.object({
  q: z.string().trim().max(80).optional().catch(undefined),
  category: z.string().trim().max(60).optional().catch(undefined),
  sort: z.enum(CAR_SORTS).optional().catch(undefined),
  dir: z.enum(["asc", "desc"]).optional().catch(undefined),
});

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["read"] });
  const cars = await listCars(ctx.team.id, searchParamsOf(request, searchSchema));
  return Response.json({ cars });
}

// GET /api/t/:teamSlug/cars/:carId/setups/:setupId/car.json — the car with one setup version, in
// exactly the CAR.json shape the CLI reads (`npm run analyse -- FILE --car CAR.json …`).
import { requireMember } from "~/server/permissions.server";
import { carFileResponse, exportCarInput } from "~/server/garage-io.server";
import type { Route } from "./+types/cars-export";

const ID = /^[A-Za-z0-9-]{1,36}$/;

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["read"], setup: ["read"] });
  if (!ID.test(params.carId) || !ID.test(params.setupId)) return Response.json({ error: "No such car or setup in this team." }, { status: 404 });
  try {
    const { car, fileName } = await exportCarInput(ctx.team.id, params.carId, params.setupId);
    return carFileResponse(car, fileName);
  } catch (error) {
    // getCar/getSetup throw data(…, 404) for pages; a resource route answers JSON.
    if ((error as { init?: { status?: number } })?.init?.status === 404)
      return Response.json({ error: "No such car or setup in this team." }, { status: 404 });
    throw error;
  }
}

// POST /api/t/:teamSlug/cars/import — body: a CAR.json (application/json). Creates a car and a setup
// sheet at version 1. 201 { carId, setupId } or 400 { errors: [...] }; a refused file changes nothing.
import { requireMember } from "~/server/permissions.server";
import { importCarFile, MAX_CAR_FILE_BYTES, setupNameOf } from "~/server/garage-io.server";
import { readText } from "~/server/body.server";
import type { Route } from "./+types/cars-import";

export async function loader() {
  return Response.json({ error: "POST a CAR.json to import it." }, { status: 405, headers: { Allow: "POST" } });
}

export async function action({ request, params }: Route.ActionArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["create"] });
  if (request.method !== "POST") return Response.json({ error: "POST a CAR.json to import it." }, { status: 405, headers: { Allow: "POST" } });
  // requireMember has refused a cross-site post (Origin) already; the body is capped before it is parsed.
  const text = await readText(request, MAX_CAR_FILE_BYTES);
  const setupName = setupNameOf(new URL(request.url).searchParams.get("setup"));
  const result = await importCarFile(ctx.team.id, ctx.user.id, text, setupName);
  if (!result.ok) return Response.json({ errors: result.errors }, { status: 400 });
  return Response.json(
    { carId: result.carId, setupId: result.setupId },
    { status: 201, headers: { Location: `/t/${ctx.team.slug}/garage/${result.carId}/setups/${result.setupId}` } },
  );
}

// POST /api/t/:teamSlug/cars/import — body: a CAR.json (application/json). Creates a car and a setup
// sheet at version 1: 201 { carId, setupId }. With ?car=<id>&sheet=<id> (a re-import) it writes the next
// version of that sheet instead: 201 { carId, setupId, version, unchanged: false, carDifferences }, or 200 with
// unchanged: true when no setup value differs. 400 { errors: [...] }; a refused file changes nothing.

const ID = /^[A-Za-z0-9-]{1,36}$/;

function targetOf(search: URLSearchParams): ImportTarget | null {
  const car = search.get("car");
  const sheet = search.get("sheet");
  if (car === null && sheet === null) return { kind: "new-car" };
  if (car === null || sheet === null || !ID.test(car) || !ID.test(sheet)) return null;
  return { kind: "new-version", carId: car, sheetId: sheet };
}
import { requireMember } from "~/server/permissions.server";
import { importCarFile, MAX_CAR_FILE_BYTES, setupNameOf, type ImportTarget } from "~/server/garage-io.server";
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
  const target = targetOf(new URL(request.url).searchParams);
  if (!target) return Response.json({ errors: ["car and sheet must be ids (?car=<car id>&sheet=<setup sheet id>)."] }, { status: 400 });
  const result = await importCarFile(ctx.team.id, ctx.user.id, text, setupName, target).catch((error) => {
    if ((error as { init?: { status?: number } })?.init?.status === 404) return { ok: false as const, errors: ["No such car or setup sheet in this team."], status: 404 };
    throw error;
  });
  if (!result.ok) return Response.json({ errors: result.errors }, { status: result.status ?? 400 });
  if (target.kind === "new-version")
    return Response.json(
      { carId: result.carId, setupId: result.setupId, version: result.version, unchanged: result.unchanged ?? false, carDifferences: result.carDifferences ?? [] },
      { status: result.unchanged ? 200 : 201 },
    );
  return Response.json(
    { carId: result.carId, setupId: result.setupId },
    { status: 201, headers: { Location: `/t/${ctx.team.slug}/garage/${result.carId}/setups/${result.setupId}` } },
  );
}

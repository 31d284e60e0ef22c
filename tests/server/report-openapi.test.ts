// The OpenAPI document is valid OpenAPI 3.1 (checked by @seriousme/openapi-schema-validator against
// the OpenAPI Initiative's published JSON Schema) and the real answers match its schemas: each answer
// parses with the zod schema the document's component is generated from, and nothing is dropped by
// the parse (no undocumented field in the strict objects).
import { Validator } from "@seriousme/openapi-schema-validator";
import { beforeAll, describe, expect, it } from "vitest";
import * as openapiRoute from "~/routes/api/openapi";
import * as summaryRoute from "~/routes/api/session-summary";
import * as tracesRoute from "~/routes/api/session-traces";
import * as compareRoute from "~/routes/api/compare";
import * as carsRoute from "~/routes/api/cars-list";
import * as setupsRoute from "~/routes/api/cars-setups";
import * as sessionsRoute from "~/routes/api/sessions";
import { carsResponseSchema, compareResponseSchema, errorSchema, sessionListSchema, sessionResponseSchema, setupsResponseSchema, tracesSchema } from "~/lib/report/api-schemas";
import { createApiToken } from "~/server/api-tokens.server";
import { appUrl, args } from "./auth-support";
import { garageWorld } from "./garage-support";
import { storeDemoSession } from "./report-support";

let w: Awaited<ReturnType<typeof garageWorld>>;
let ids: string[];
let token: string;
beforeAll(async () => {
  w = await garageWorld();
  ids = [
    (await storeDemoSession("marlin-comma", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, sessionDate: "2026-05-16" })).id,
    (await storeDemoSession("marlin-splitter", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, sessionDate: "2026-06-02" })).id,
  ];
  const made = await createApiToken(w.userIds.analyst, w.team.slug, "openapi tests");
  if (!made.ok) throw new Error(made.message);
  token = made.token;
});

type Loader = (a: never) => Promise<Response> | Response;
async function get(loader: Loader, path: string, params: Record<string, string> = {}) {
  try {
    return await loader(args(new Request(`${appUrl}${path}`, { headers: { authorization: `Bearer ${token}` } }), params));
  } catch (thrown) {
    if (thrown instanceof Response) return thrown;
    throw thrown;
  }
}

/** Parses with the schema and checks nothing was dropped (strict objects keep every field). */
function matches(schema: { parse: (v: unknown) => unknown }, body: unknown) {
  expect(schema.parse(body)).toEqual(body);
}

describe("GET /api/openapi.json", () => {
  it("is a valid OpenAPI 3.1 document describing every route of the data API", async () => {
    const res = await (openapiRoute.loader as () => Response)();
    expect(res.status).toBe(200);
    const doc = await res.json();
    const validator = new Validator();
    const result = await validator.validate(doc);
    expect(result.errors ?? []).toEqual([]);
    expect(result.valid).toBe(true);
    expect(Object.keys(doc.paths).sort()).toEqual(
      ["/api/cars", "/api/cars/{carId}/setups", "/api/compare", "/api/sessions", "/api/sessions/{sessionId}", "/api/sessions/{sessionId}/bands.csv", "/api/sessions/{sessionId}/traces"].sort(),
    );
    // Every $ref resolves to a component.
    for (const ref of JSON.stringify(doc).matchAll(/"\$ref":"#\/components\/schemas\/([^"]+)"/g)) expect(doc.components.schemas).toHaveProperty(ref[1]);
  });
});

describe("answers match the document", () => {
  it("session, traces, compare, cars, setups and the session list", async () => {
    const session = await get(summaryRoute.loader as Loader, `/api/sessions/${ids[0]}`, { sessionId: ids[0] });
    expect(session.status).toBe(200);
    matches(sessionResponseSchema, await session.json());
    const traces = await get(tracesRoute.loader as Loader, `/api/sessions/${ids[0]}/traces`, { sessionId: ids[0] });
    matches(tracesSchema, await traces.json());
    const compare = await get(compareRoute.loader as Loader, `/api/compare?ids=${ids.join(",")}`);
    expect(compare.status).toBe(200);
    matches(compareResponseSchema, await compare.json());
    const cars = await get(carsRoute.loader as Loader, `/api/cars`);
    const carsBody = await cars.json();
    matches(carsResponseSchema, carsBody);
    expect(carsBody.cars.map((c: { id: string }) => c.id)).toContain(w.carId);
    expect(carsBody.cars.map((c: { id: string }) => c.id)).not.toContain(w.rivalCarId);
    const setups = await get(setupsRoute.loader as Loader, `/api/cars/${w.carId}/setups`, { carId: w.carId });
    const setupsBody = await setups.json();
    matches(setupsResponseSchema, setupsBody);
    expect(setupsBody.setups.map((s: { id: string }) => s.id)).toContain(w.setupId);
    const list = await get(sessionsRoute.loader as Loader, `/api/sessions?limit=1`);
    expect(list.status).toBe(200);
    const listBody = await list.json();
    sessionListSchema.parse(listBody);
    expect(listBody.sessions).toHaveLength(1);
    expect(listBody.next).not.toBeNull();
  });
  it("errors are {error} with the documented status: another team's car is 404", async () => {
    const res = await get(setupsRoute.loader as Loader, `/api/cars/${w.rivalCarId}/setups`, { carId: w.rivalCarId });
    expect(res.status).toBe(404);
    matches(errorSchema, await res.json());
  });
});

// The probe: a form on another port of the same host created a car through POST /api/t/:team/cars/import,
// because SameSite=Lax cookies ride along within a site (RFC 6265bis §5.6.7.1: a "site" ignores the port)
// and the resource route checked no Origin. Every cookie-authenticated write now checks where it came from.
import { readFileSync } from "node:fs";
import { beforeAll, describe, expect, it } from "vitest";
import { count, eq } from "drizzle-orm";
import { db } from "~/server/db.server";
import { cars } from "~/db/schema/garage";
import * as apiImport from "~/routes/api/cars-import";
import * as settingsRoute from "~/routes/teams/settings";
import { crossSiteProblem } from "~/server/same-origin.server";
import { appUrl, args, outcome } from "./auth-support";
import { garageWorld } from "./garage-support";

type World = Awaited<ReturnType<typeof garageWorld>>;
let w: World;
beforeAll(async () => {
  w = await garageWorld();
});

const carFile = readFileSync("sample-data/cars/marlin-sr2.json", "utf8");
const otherPort = new URL(appUrl);
otherPort.port = String(Number(otherPort.port || 80) + 1);

async function carCount(): Promise<number> {
  const [row] = await db.select({ n: count() }).from(cars).where(eq(cars.teamId, w.team.id));
  return Number(row.n);
}

function importRequest(headers: Record<string, string>) {
  return new Request(`${appUrl}/api/t/${w.team.slug}/cars/import`, {
    method: "POST",
    headers: { cookie: w.jars.engineer.header(), ...headers },
    body: carFile,
  });
}

describe("cross-site writes", () => {
  it("refuses the probe's form from another port of the same host, and creates no car", async () => {
    const before = await carCount();
    // What Chromium sends for a <form enctype="text/plain"> posted from http://127.0.0.1:<other port>.
    const forged = importRequest({ origin: otherPort.origin, "content-type": "text/plain", "sec-fetch-site": "same-site" });
    const result = await outcome(() => apiImport.action(args(forged, { teamSlug: w.team.slug })));
    // RFC 9110 §15.5.4: 403 Forbidden.
    expect(result.status).toBe(403);
    expect((result.body as { error: string }).error).toMatch(new RegExp(`came from ${otherPort.origin.replace(/[.:/]/g, "\\$&")}`));
    expect(await carCount()).toBe(before);
  });

  it("refuses a cookie-carrying form without any Origin, and a page form from another origin", async () => {
    const before = await carCount();
    const bare = await outcome(() => apiImport.action(args(importRequest({ "content-type": "text/plain" }), { teamSlug: w.team.slug })));
    expect(bare.status).toBe(403);
    const renamed = new Request(`${appUrl}/t/${w.team.slug}/settings`, {
      method: "POST",
      headers: { cookie: w.jars.owner.header(), origin: "http://evil.example", "content-type": "application/x-www-form-urlencoded" },
      body: new URLSearchParams({ intent: "rename", name: "Taken Over" }),
    });
    expect((await outcome(() => settingsRoute.action(args(renamed, { teamSlug: w.team.slug })))).status).toBe(403);
    expect(await carCount()).toBe(before);
  });

  it("lets our own pages, JSON clients and token holders through", async () => {
    const before = await carCount();
    const ours = await outcome(() => apiImport.action(args(importRequest({ origin: appUrl, "content-type": "application/json" }), { teamSlug: w.team.slug })));
    // RFC 9110 §15.3.2: 201 Created.
    expect(ours.status).toBe(201);
    // Fetch Standard: a cross-origin JSON body needs a CORS preflight, which Rakeline never answers, so
    // a JSON request without Origin (a script such as curl) cannot be a forged browser form.
    const script = await outcome(() => apiImport.action(args(importRequest({ "content-type": "application/json" }), { teamSlug: w.team.slug })));
    expect(script.status).toBe(201);
    expect(await carCount()).toBe(before + 2);
    expect(crossSiteProblem(new Request(`${appUrl}/api/sessions`, { method: "POST", headers: { authorization: "Bearer abc", "content-type": "text/plain" } }))).toBeNull();
    expect(crossSiteProblem(new Request(`${appUrl}/api/sessions`, { method: "GET", headers: { origin: "http://evil.example" } }))).toBeNull();
    expect(crossSiteProblem(new Request(`${appUrl}/api/x`, { method: "POST", headers: { "sec-fetch-site": "same-origin" } }))).toBeNull();
    expect(crossSiteProblem(new Request(`${appUrl}/api/x`, { method: "POST", headers: { origin: "null" } }))).toMatch(/without an origin/);
  });
});

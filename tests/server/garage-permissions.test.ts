// Permission matrix for every Garage route, against the real MariaDB and better-auth sessions.
// Expected roles are the product rule (issue #4 §6): owner and engineer create/edit/duplicate/import;
// analyst and driver read; a non-member gets 404 (DEVELOPERS.md: another team is never revealed).
// Status codes: RFC 9110 §15 (200 OK, 201 Created, 302 Found, 400, 401, 403, 404).
import { beforeAll, describe, expect, it } from "vitest";
import * as carsRoute from "~/routes/garage/cars";
import * as carNewRoute from "~/routes/garage/car-new";
import * as importRoute from "~/routes/garage/import";
import * as carRoute from "~/routes/garage/car";
import * as carEditRoute from "~/routes/garage/car-edit";
import * as setupNewRoute from "~/routes/garage/setup-new";
import * as setupRoute from "~/routes/garage/setup";
import * as setupEditRoute from "~/routes/garage/setup-edit";
import * as setupDiffRoute from "~/routes/garage/setup-diff";
import * as apiCars from "~/routes/api/cars";
import * as apiExport from "~/routes/api/cars-export";
import * as apiImport from "~/routes/api/cars-import";
import { appUrl, args, CookieJar, formRequest, getRequest, outcome } from "./auth-support";
import { garageWorld, WHO, type Who } from "./garage-support";

type World = Awaited<ReturnType<typeof garageWorld>>;
let w: World;
beforeAll(async () => {
  w = await garageWorld();
});

type Case = { name: string; editors: boolean; ok: number; run: (jar: CookieJar) => Promise<{ status: number }> };

const p = () => ({ teamSlug: w.team.slug, carId: w.carId, setupId: w.setupId });
const page = () => `/t/${w.team.slug}/garage`;
const jsonPost = (path: string, body: string, jar: CookieJar) =>
  new Request(`${appUrl}${path}`, { method: "POST", headers: { origin: appUrl, cookie: jar.header(), "content-type": "application/json" }, body });

const CASES: Case[] = [
  { name: "GET garage (car list)", editors: false, ok: 200, run: (j) => outcome(() => carsRoute.loader(args(getRequest(page(), j), p()))) },
  { name: "GET garage/new", editors: true, ok: 200, run: (j) => outcome(() => carNewRoute.loader(args(getRequest(`${page()}/new`, j), p()))) },
  { name: "POST garage/new (empty form)", editors: true, ok: 400, run: (j) => outcome(() => carNewRoute.action(args(formRequest(`${page()}/new`, {}, j), p()))) },
  { name: "GET garage/import", editors: true, ok: 200, run: (j) => outcome(() => importRoute.loader(args(getRequest(`${page()}/import`, j), p()))) },
  { name: "POST garage/import (not JSON)", editors: true, ok: 400, run: (j) => outcome(() => importRoute.action(args(formRequest(`${page()}/import`, { text: "nope" }, j), p()))) },
  { name: "GET garage/:carId", editors: false, ok: 200, run: (j) => outcome(() => carRoute.loader(args(getRequest(`${page()}/${w.carId}`, j), p()))) },
  { name: "POST garage/:carId duplicate setup", editors: true, ok: 302, run: (j) => outcome(() => carRoute.action(args(formRequest(`${page()}/${w.carId}`, { intent: "duplicate-setup", setupId: w.setupId }, j), p()))) },
  { name: "POST garage/:carId duplicate car", editors: true, ok: 302, run: (j) => outcome(() => carRoute.action(args(formRequest(`${page()}/${w.carId}`, { intent: "duplicate-car" }, j), p()))) },
  { name: "GET garage/:carId/edit", editors: true, ok: 200, run: (j) => outcome(() => carEditRoute.loader(args(getRequest(`${page()}/${w.carId}/edit`, j), p()))) },
  { name: "POST garage/:carId/edit (empty form)", editors: true, ok: 400, run: (j) => outcome(() => carEditRoute.action(args(formRequest(`${page()}/${w.carId}/edit`, {}, j), p()))) },
  { name: "GET setups/new", editors: true, ok: 200, run: (j) => outcome(() => setupNewRoute.loader(args(getRequest(`${page()}/${w.carId}/setups/new`, j), p()))) },
  { name: "POST setups/new (empty form)", editors: true, ok: 400, run: (j) => outcome(() => setupNewRoute.action(args(formRequest(`${page()}/${w.carId}/setups/new`, {}, j), p()))) },
  { name: "GET setups/:setupId", editors: false, ok: 200, run: (j) => outcome(() => setupRoute.loader(args(getRequest(`${page()}/${w.carId}/setups/${w.setupId}`, j), p()))) },
  { name: "POST setups/:setupId (duplicate)", editors: true, ok: 302, run: (j) => outcome(() => setupRoute.action(args(formRequest(`${page()}/${w.carId}/setups/${w.setupId}`, {}, j), p()))) },
  { name: "GET setups/:setupId/edit", editors: true, ok: 200, run: (j) => outcome(() => setupEditRoute.loader(args(getRequest(`${page()}/${w.carId}/setups/${w.setupId}/edit`, j), p()))) },
  { name: "POST setups/:setupId/edit (empty form)", editors: true, ok: 400, run: (j) => outcome(() => setupEditRoute.action(args(formRequest(`${page()}/${w.carId}/setups/${w.setupId}/edit`, {}, j), p()))) },
  { name: "GET setups/:setupId/diff", editors: false, ok: 200, run: (j) => outcome(() => setupDiffRoute.loader(args(getRequest(`${page()}/${w.carId}/setups/${w.setupId}/diff?against=${w.setupId}`, j), p()))) },
  { name: "GET api cars", editors: false, ok: 200, run: (j) => outcome(() => apiCars.loader(args(getRequest(`/api/t/${w.team.slug}/cars`, j), p()))) },
  { name: "GET api car.json export", editors: false, ok: 200, run: (j) => outcome(() => apiExport.loader(args(getRequest(`/api/t/${w.team.slug}/cars/${w.carId}/setups/${w.setupId}/car.json`, j), p()))) },
  { name: "POST api import (bad JSON)", editors: true, ok: 400, run: (j) => outcome(() => apiImport.action(args(jsonPost(`/api/t/${w.team.slug}/cars/import`, "{", j), p()))) },
];

function expected(c: Case, who: Who): number {
  if (who === "outsider") return 404;
  if (c.editors && (who === "analyst" || who === "driver")) return 403;
  return c.ok;
}

describe.each(CASES)("$name", (c) => {
  it.each(WHO)("as %s", async (who) => {
    const result = await c.run(w.jars[who]);
    expect(result.status).toBe(expected(c, who));
  });

  it("signed out: pages go to sign-in (302), resource routes answer 401", async () => {
    const result = await c.run(new CookieJar());
    expect(result.status).toBe(c.name.includes("api") ? 401 : 302);
  });
});

describe("another team's rows", () => {
  it("a rival team's car id under our team's URL is 404 for our owner, on every route", async () => {
    const params = { teamSlug: w.team.slug, carId: w.rivalCarId, setupId: w.rivalSetupId };
    const jar = w.jars.owner;
    const base = `${page()}/${w.rivalCarId}`;
    const checks = [
      outcome(() => carRoute.loader(args(getRequest(base, jar), params))),
      outcome(() => carEditRoute.action(args(formRequest(`${base}/edit`, {}, jar), params))),
      outcome(() => setupRoute.loader(args(getRequest(`${base}/setups/${w.rivalSetupId}`, jar), params))),
      outcome(() => setupEditRoute.loader(args(getRequest(`${base}/setups/${w.rivalSetupId}/edit`, jar), params))),
      outcome(() => apiExport.loader(args(getRequest(`/api/t/${w.team.slug}/cars/${w.rivalCarId}/setups/${w.rivalSetupId}/car.json`, jar), params))),
    ];
    for (const result of await Promise.all(checks)) expect(result.status).toBe(404);
  });

  it("our car with a rival team's setup id is 404 (the setup must belong to the car and team)", async () => {
    const params = { teamSlug: w.team.slug, carId: w.carId, setupId: w.rivalSetupId };
    const result = await outcome(() => setupRoute.loader(args(getRequest(`${page()}/${w.carId}/setups/${w.rivalSetupId}`, w.jars.owner), params)));
    expect(result.status).toBe(404);
  });
});

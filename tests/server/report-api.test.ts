// The report's data API against the real database: status codes (RFC 9110 §15), shapes, team
// scoping (another team's id is 404, DEVELOPERS.md), ETag revalidation (RFC 9110 §13.1.2: a
// matching If-None-Match gets 304 without a body), and CSV per RFC 4180 with formula cells
// neutralised (OWASP "CSV Injection").
import Papa from "papaparse";
import { beforeAll, describe, expect, it } from "vitest";
import * as summaryRoute from "~/routes/api/session-summary";
import * as bandsRoute from "~/routes/api/session-bands-csv";
import * as tracesRoute from "~/routes/api/session-traces";
import { createApiToken } from "~/server/api-tokens.server";
import { BAND_CSV_FIELDS } from "~/lib/report/csv";
import { appUrl, args, type CookieJar } from "./auth-support";
import { garageWorld } from "./garage-support";
import { storeDemoSession } from "./report-support";
import { eq } from "drizzle-orm";
import { db } from "~/server/db.server";
import { analysisSessions } from "~/db/schema/sessions";
import { summaryTextOf } from "~/server/report/session.server";

let w: Awaited<ReturnType<typeof garageWorld>>;
let own: Awaited<ReturnType<typeof storeDemoSession>>;
let rivalId: string;
let token: string;
beforeAll(async () => {
  w = await garageWorld();
  own = await storeDemoSession("marlin-comma", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: '=HYPERLINK("http://x.example","FP1")' });
  rivalId = (await storeDemoSession("marlin-splitter", { teamId: w.outsider.teamId, carId: w.rivalCarId, setupId: w.rivalSetupId })).id;
  const made = await createApiToken(w.userIds.analyst, w.team.slug, "report tests");
  if (!made.ok) throw new Error(made.message);
  token = made.token;
});

type Loader = (a: never) => Promise<Response>;
async function call(loader: Loader, path: string, sessionId: string, auth: { jar?: CookieJar; token?: string; headers?: Record<string, string> }) {
  const headers: Record<string, string> = { ...auth.headers };
  if (auth.jar) headers.cookie = auth.jar.header();
  if (auth.token) headers.authorization = `Bearer ${auth.token}`;
  try {
    return await loader(args(new Request(`${appUrl}${path}`, { headers }), { sessionId }));
  } catch (thrown) {
    if (thrown instanceof Response) return thrown;
    throw thrown;
  }
}

describe("GET /api/sessions/:id", () => {
  it("gives the session's details and summary of record to a cookie (with ?team=) and to a token", async () => {
    const viaCookie = await call(summaryRoute.loader as Loader, `/api/sessions/${own.id}?team=${w.team.slug}`, own.id, { jar: w.jars.analyst });
    expect(viaCookie.status).toBe(200);
    expect(viaCookie.headers.get("content-type")).toMatch(/^application\/json/);
    const body = await viaCookie.json();
    expect(body.session).toMatchObject({ id: own.id, state: "checked", car: { id: w.carId }, setup: { id: w.setupId, version: 1 }, url: `${appUrl}/t/${w.team.slug}/sessions/${own.id}` });
    const { traces: _traces, ...stored } = own.summary;
    expect(body.summary).toEqual(JSON.parse(JSON.stringify(stored)));
    const viaToken = await call(summaryRoute.loader as Loader, `/api/sessions/${own.id}`, own.id, { token });
    expect(viaToken.status).toBe(200);
    expect((await viaToken.json()).summary.aero.cla_total_m2).toBe(own.summary.aero.cla_total_m2);
  });
  it("answers 304 to a matching If-None-Match and 200 to a stale one", async () => {
    const first = await call(summaryRoute.loader as Loader, `/api/sessions/${own.id}`, own.id, { token });
    const etag = first.headers.get("etag")!;
    expect(etag).toMatch(/^W\/".+"$/);
    expect(first.headers.get("cache-control")).toBe("private, no-cache");
    const again = await call(summaryRoute.loader as Loader, `/api/sessions/${own.id}`, own.id, { token, headers: { "if-none-match": etag } });
    expect(again.status).toBe(304);
    expect(await again.text()).toBe("");
    const stale = await call(summaryRoute.loader as Loader, `/api/sessions/${own.id}`, own.id, { token, headers: { "if-none-match": 'W/"other"' } });
    expect(stale.status).toBe(200);
  });
  it("answers 404 for another team's session and an unknown id, 401 without credentials, 403 for a driver", async () => {
    const rival = await call(summaryRoute.loader as Loader, `/api/sessions/${rivalId}`, rivalId, { token });
    expect(rival.status).toBe(404);
    expect(await rival.json()).toEqual({ error: expect.any(String) });
    expect((await call(summaryRoute.loader as Loader, `/api/sessions/nope`, "nope", { token })).status).toBe(404);
    expect((await call(summaryRoute.loader as Loader, `/api/sessions/${own.id}`, own.id, { jar: w.jars.outsider })).status).toBe(404);
    expect((await call(summaryRoute.loader as Loader, `/api/sessions/${own.id}`, own.id, {})).status).toBe(401);
    expect((await call(summaryRoute.loader as Loader, `/api/sessions/${own.id}?team=${w.team.slug}`, own.id, { jar: w.jars.driver })).status).toBe(403);
  });
});

describe("GET /api/sessions/:id/bands.csv", () => {
  it("is well-formed CSV, one row per band, with the session's formula-like name neutralised", async () => {
    const res = await call(bandsRoute.loader as Loader, `/api/sessions/${own.id}/bands.csv`, own.id, { token });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/^text\/csv/);
    expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="[A-Za-z0-9.-]+\.csv"$/);
    const text = await res.text();
    expect(text.split("\r\n").length).toBe(own.summary.bands.length + 2);
    const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toEqual(["session", "date", ...BAND_CSV_FIELDS]);
    expect(parsed.data).toHaveLength(own.summary.bands.length);
    expect(parsed.data[0].session).toBe(`'=HYPERLINK("http://x.example","FP1")`);
    parsed.data.forEach((row, i) => {
      const b = own.summary.bands[i];
      expect(Number(row.min_kmh)).toBe(b.min_kmh);
      expect(row.balance_front_pct === "" ? null : Number(row.balance_front_pct)).toBe(b.balance_front_pct);
    });
    expect((await call(bandsRoute.loader as Loader, `/api/sessions/${rivalId}/bands.csv`, rivalId, { token })).status).toBe(404);
  });
});

describe("GET /api/sessions/:id/traces", () => {
  it("gives the decimated traces as columns of equal length", async () => {
    const res = await call(tracesRoute.loader as Loader, `/api/sessions/${own.id}/traces`, own.id, { token });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.id).toBe(own.id);
    expect(body.t_s.length).toBeGreaterThan(100);
    for (const name of ["speed_kmh", "lat_accel_g", "damper_fl_mm"]) {
      expect(body.channels[name].min).toHaveLength(body.t_s.length);
      expect(body.channels[name].max).toHaveLength(body.t_s.length);
    }
    const etag = res.headers.get("etag")!;
    expect((await call(tracesRoute.loader as Loader, `/api/sessions/${own.id}/traces`, own.id, { token, headers: { "if-none-match": etag } })).status).toBe(304);
    expect((await call(tracesRoute.loader as Loader, `/api/sessions/${rivalId}/traces`, rivalId, { token })).status).toBe(404);
  });
});

describe("GET /api/sessions/:id passes the stored summary text through", () => {
  it("answers the stored summary unchanged, and null while a session has no summary of record", async () => {
    const other = await storeDemoSession("marlin-splitter", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "Not read yet" });
    const before = await call(summaryRoute.loader as Loader, `/api/sessions/${other.id}`, other.id, { token });
    const { traces: _traces, ...stored } = other.summary;
    expect((await before.json()).summary).toEqual(JSON.parse(JSON.stringify(stored)));
    await db.update(analysisSessions).set({ summary: null, status: "received", updatedAt: new Date() }).where(eq(analysisSessions.id, other.id));
    const res = await call(summaryRoute.loader as Loader, `/api/sessions/${other.id}`, other.id, { token });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.summary).toBeNull();
    expect(body.session).toMatchObject({ id: other.id, state: "received" });
  });
  it("takes only an object with bands, aero and car as a summary of record (summaryOf's rule on the text)", () => {
    expect(summaryTextOf(null)).toBeNull();
    expect(summaryTextOf("[]")).toBeNull();
    expect(summaryTextOf('{"bands":[],"aero":{}}')).toBeNull();
    const text = '{"car":{"wheelbase_mm":2500},"aero":{"cla_total_m2":1.2},"bands":[]}';
    expect(summaryTextOf(text)).toBe(text);
  });
});

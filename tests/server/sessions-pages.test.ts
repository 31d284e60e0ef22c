// The Sessions list page (/t/:teamSlug/sessions) and the venues page (/t/:teamSlug/venues): loaders and
// actions with real requests; sort, filter and pages come from the URL; every query is team-scoped.
import { readFileSync } from "node:fs";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { auditLog } from "~/db/schema/audit";
import { member } from "~/db/schema/auth";
import { venues } from "~/db/schema/sessions";
import { createApiToken } from "~/server/api-tokens.server";
import { db } from "~/server/db.server";
import * as listPage from "~/routes/sessions/list";
import * as venuesPage from "~/routes/sessions/venues";
import * as apiSessions from "~/routes/api/sessions";
import * as dashboard from "~/routes/teams/dashboard";
import { appUrl, args, formRequest, getRequest, outcome } from "./auth-support";
import { ingestWorld, LOGS, mapOf } from "./ingest-support";

let w: Awaited<ReturnType<typeof ingestWorld>>;
beforeAll(async () => {
  w = await ingestWorld("pages");
});

type ListData = { rows: Array<{ date: string; run: string; claTotalM2: number | null; balanceFrontPct: number | null; state: string }>; any: boolean; hasNext: boolean; problem: string | null };
const listOf = async (query = "") => (await outcome(() => listPage.loader(args(getRequest(`/t/${w.slug}/sessions${query}`, w.jar), { teamSlug: w.slug })))).body as ListData;

async function apiUpload(log: string, car: "marlin-sr2" | "vesper-gt4r", meta: Record<string, unknown>) {
  const made = await createApiToken(w.userId, w.slug, "seed");
  if (!made.ok) throw new Error("token");
  const form = new FormData();
  form.set("meta", JSON.stringify({ car: w.cars[car].carId, map: mapOf(log), ...meta }));
  form.set("file", new File([new Uint8Array(readFileSync(`${LOGS}/${log}.csv`))], `${log}.csv`));
  const res = await outcome(() => apiSessions.action(args(new Request(`${appUrl}/api/sessions`, { method: "POST", headers: { authorization: `Bearer ${made.token}` }, body: form }))));
  if (res.status !== 201) throw new Error(JSON.stringify(res.body));
}

describe("Sessions list page", () => {
  it("an empty team is told what to do first", async () => {
    const data = await listOf();
    expect(data.any).toBe(false);
    expect(data.rows).toEqual([]);
  });

  it("lists, sorts and filters from the URL", async () => {
    await apiUpload("marlin-kestrel-comma", "marlin-sr2", { date: "2026-05-16", run: "Run A", venue: "Kestrel Bank Raceway" });
    await apiUpload("vesper-kestrel-tab", "vesper-gt4r", { date: "2026-05-17", run: "Run B", venue: "Kestrel Bank Raceway" });
    await apiUpload("vesper-coldwater-comma", "vesper-gt4r", { date: "2026-05-18", run: "Run C", venue: "Coldwater Ridge" });
    expect((await listOf()).rows.map((r) => r.run)).toEqual(["Run C", "Run B", "Run A"]);
    expect((await listOf("?sort=date&dir=asc")).rows.map((r) => r.run)).toEqual(["Run A", "Run B", "Run C"]);
    const byCla = (await listOf("?sort=cla&dir=asc")).rows.map((r) => r.claTotalM2);
    expect(byCla).toEqual([...byCla].sort((a, b) => (a ?? -1) - (b ?? -1)));
    expect((await listOf(`?car=${w.cars["vesper-gt4r"].carId}`)).rows.map((r) => r.run)).toEqual(["Run C", "Run B"]);
    expect((await listOf("?from=2026-05-17&to=2026-05-17")).rows.map((r) => r.run)).toEqual(["Run B"]);
    expect((await listOf("?state=flagged")).rows).toEqual([]);
    const bad = await listOf("?from=2026-13-40");
    expect(bad.problem).toMatch(/^from: /);
    expect(bad.rows).toHaveLength(3);
    expect((await listOf("?page=2")).rows).toEqual([]);
    // The dashboard shows the newest sessions (it said "coming in the next release" before).
    const home = await outcome(() => dashboard.loader(args(getRequest(`/t/${w.slug}`, w.jar), { teamSlug: w.slug })));
    const recent = (home.body as { recentSessions: Array<{ run: string; claTotalM2: number | null; balanceFrontPct: number | null }> }).recentSessions;
    expect(recent.map((r) => r.run)).toEqual(["Run C", "Run B", "Run A"]);
    // Each row carries the session's headline ClA and balance, the same figures as the Sessions list.
    const listed = (await listOf("")).rows;
    expect(recent.every((r) => typeof r.claTotalM2 === "number" && typeof r.balanceFrontPct === "number")).toBe(true);
    expect(recent.map((r) => [r.claTotalM2, r.balanceFrontPct])).toEqual(listed.map((r) => [r.claTotalM2, r.balanceFrontPct]));
  });

  it("a driver's role does not read the list (403); another team's member gets 404", async () => {
    const [m] = await db.select().from(member).where(eq(member.userId, w.userId));
    await db.update(member).set({ role: "driver" }).where(eq(member.id, m.id));
    try {
      expect((await outcome(() => listPage.loader(args(getRequest(`/t/${w.slug}/sessions`, w.jar), { teamSlug: w.slug })))).status).toBe(403);
    } finally {
      await db.update(member).set({ role: "owner" }).where(eq(member.id, m.id));
    }
    const other = await ingestWorld("pages-other");
    expect((await outcome(() => listPage.loader(args(getRequest(`/t/${w.slug}/sessions`, other.jar), { teamSlug: w.slug })))).status).toBe(404);
  });
});

describe("Venues page", () => {
  const act = (fields: Record<string, string>) => outcome(() => venuesPage.action(args(formRequest(`/t/${w.slug}/venues`, fields, w.jar), { teamSlug: w.slug })));

  it("adds, edits and removes an unused venue, with audit events; keeps a used one", async () => {
    const bad = await act({ intent: "create", name: "", altitudeM: "high" });
    expect(bad.status).toBe(400);
    expect(bad.body).toMatchObject({ errors: { name: "Name the venue.", altitudeM: 'Altitude: "high" is not a number.' } });
    expect((await act({ intent: "create", name: "Harrow Fell Sprint", altitudeM: "412,5" })).status).toBe(200);
    const [made] = await db.select().from(venues).where(eq(venues.name, "Harrow Fell Sprint"));
    expect(made.altitudeM).toBe(412.5);
    expect((await act({ intent: "create", name: "Harrow Fell Sprint" })).status).toBe(400);
    expect((await act({ intent: "update", venueId: made.id, name: "Harrow Fell Sprint", altitudeM: "420", notes: "Paddock at the top" })).status).toBe(200);
    expect((await db.select().from(venues).where(eq(venues.id, made.id)))[0]).toMatchObject({ altitudeM: 420, notes: "Paddock at the top" });
    expect((await act({ intent: "delete", venueId: made.id })).status).toBe(200);
    expect(await db.select().from(venues).where(eq(venues.id, made.id))).toEqual([]);
    const actions = (await db.select().from(auditLog).where(eq(auditLog.subjectId, made.id))).map((e) => e.action).sort();
    expect(actions).toEqual(["venue_created", "venue_deleted", "venue_updated"]);

    const page = await outcome(() => venuesPage.loader(args(getRequest(`/t/${w.slug}/venues`, w.jar), { teamSlug: w.slug })));
    const used = (page.body as { venues: Array<{ id: string; name: string; sessions: number }> }).venues.find((v) => v.name === "Kestrel Bank Raceway")!;
    expect(used.sessions).toBe(2);
    expect((await act({ intent: "delete", venueId: used.id })).status).toBe(409);
  });
});

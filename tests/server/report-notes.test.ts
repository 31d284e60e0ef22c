// Notes on a session or band, and saved comparisons: who may write them (access.ts: session:annotate
// for owner, engineer and analyst), team scoping (another team answers 404, DEVELOPERS.md), field
// messages for bad input, an audit event with each write, and where they show up.
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import * as page from "~/routes/sessions/session";
import * as comparePage from "~/routes/compare/compare";
import { db } from "~/server/db.server";
import { auditLog } from "~/db/schema/audit";
import { args, formRequest, getRequest, outcome } from "./auth-support";
import { garageWorld } from "./garage-support";
import { storeDemoSession } from "./report-support";

let w: Awaited<ReturnType<typeof garageWorld>>;
let a: string;
let b: string;
let rival: string;
beforeAll(async () => {
  w = await garageWorld();
  a = (await storeDemoSession("marlin-comma", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "Notes A" })).id;
  b = (await storeDemoSession("marlin-splitter", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "Notes B" })).id;
  rival = (await storeDemoSession("marlin-comma", { teamId: w.outsider.teamId, carId: w.rivalCarId, setupId: w.rivalSetupId })).id;
});

const annotate = (who: keyof typeof w.jars, id: string, fields: Record<string, string>) =>
  outcome(() => page.action(args(formRequest(`/t/${w.team.slug}/sessions/${id}`, { intent: "annotate", ...fields }, w.jars[who]), { teamSlug: w.team.slug, sessionId: id })));

describe("notes on a session or band", () => {
  it("an analyst adds a band note; the report lists it and the audit log records it", async () => {
    const out = await annotate("analyst", a, { band: "80-120", body: "  front locking into the hairpin  " });
    expect(out.status).toBe(200);
    const report = await outcome(() => page.loader(args(getRequest(`/t/${w.team.slug}/sessions/${a}`, w.jars.engineer), { teamSlug: w.team.slug, sessionId: a })));
    const notes = (report.body as { notes: { body: string; bandMinKmh: number | null }[] }).notes;
    expect(notes.map((n) => [n.bandMinKmh, n.body])).toEqual([[80, "front locking into the hairpin"]]);
    const events = await db.select().from(auditLog).where(and(eq(auditLog.teamId, w.team.id), eq(auditLog.action, "session_annotated"), eq(auditLog.subjectId, a)));
    expect(events).toHaveLength(1);
  });
  it("refuses an empty note and a band the session does not have (400 with a field message)", async () => {
    const empty = await annotate("engineer", a, { body: "   " });
    expect(empty.status).toBe(400);
    expect((empty.body as { errors: Record<string, string> }).errors.body).toMatch(/Write the note/);
    const noBand = await annotate("engineer", a, { band: "90-95", body: "x" });
    expect(noBand.status).toBe(400);
    expect((noBand.body as { errors: Record<string, string> }).errors.band).toMatch(/not one of this session's/);
  });
  it("a driver may not annotate (403); another team's session is 404", async () => {
    expect((await annotate("driver", a, { body: "x" })).status).toBe(403);
    expect((await annotate("owner", rival, { body: "x" })).status).toBe(404);
    expect((await annotate("outsider", a, { body: "x" })).status).toBe(404);
  });
});

describe("saved comparisons", () => {
  const save = (who: keyof typeof w.jars, fields: Record<string, string>) =>
    outcome(() => comparePage.action(args(formRequest(`/t/${w.team.slug}/compare`, { intent: "save", ...fields }, w.jars[who]), { teamSlug: w.team.slug })));
  it("saves under a name, lists it, and shows the sessions' notes beside the comparison", async () => {
    expect((await save("analyst", { name: "Splitter test", ids: `${a},${b}` })).status).toBe(200);
    const out = await outcome(() => comparePage.loader(args(getRequest(`/t/${w.team.slug}/compare?ids=${a},${b}`, w.jars.analyst), { teamSlug: w.team.slug })));
    const body = out.body as { saved: { name: string; sessionIds: string[] }[]; notes: { sessionId: string }[] };
    expect(body.saved.find((s) => s.name === "Splitter test")?.sessionIds).toEqual([a, b]);
    expect(body.notes.map((n) => n.sessionId)).toContain(a);
  });
  it("refuses another team's session and a single session (400), and a driver (403)", async () => {
    expect((await save("analyst", { name: "Mixed", ids: `${a},${rival}` })).status).toBe(400);
    expect((await save("analyst", { name: "One", ids: a })).status).toBe(400);
    expect((await save("driver", { name: "Driver", ids: `${a},${b}` })).status).toBe(403);
  });
});

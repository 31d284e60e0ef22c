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

describe("editing and deleting a note (its author, or the team's owner; audited)", () => {
  const change = (who: keyof typeof w.jars, id: string, fields: Record<string, string>) =>
    outcome(() => page.action(args(formRequest(`/t/${w.team.slug}/sessions/${id}`, fields, w.jars[who]), { teamSlug: w.team.slug, sessionId: id })));
  const notesOf = async (id: string) => {
    const report = await outcome(() => page.loader(args(getRequest(`/t/${w.team.slug}/sessions/${id}`, w.jars.owner), { teamSlug: w.team.slug, sessionId: id })));
    return (report.body as { notes: { id: string; body: string; authorId: string | null }[] }).notes;
  };
  const events = (action: string) => db.select().from(auditLog).where(and(eq(auditLog.teamId, w.team.id), eq(auditLog.action, action), eq(auditLog.subjectId, b)));

  it("the author edits their own note; another member may not (403); the text is checked like a new note", async () => {
    expect((await annotate("analyst", b, { body: "rear steps out at the kink" })).status).toBe(200);
    const note = (await notesOf(b)).find((n) => n.body === "rear steps out at the kink")!;
    expect(note.authorId).toBe(w.userIds.analyst);
    expect((await change("engineer", b, { intent: "edit-note", noteId: note.id, body: "not mine to change" })).status).toBe(403);
    const empty = await change("analyst", b, { intent: "edit-note", noteId: note.id, body: "  " });
    expect(empty.status).toBe(400);
    expect((empty.body as { errors: Record<string, string> }).errors.body).toMatch(/Write the note/);
    expect((await change("analyst", b, { intent: "edit-note", noteId: note.id, body: "  rear steps out at the fast kink " })).status).toBe(200);
    expect((await notesOf(b)).find((n) => n.id === note.id)?.body).toBe("rear steps out at the fast kink");
    expect(await events("annotation_edited")).toHaveLength(1);
  });

  it("the owner deletes an analyst's note; a driver (403), another team's member and a wrong session (404) change nothing", async () => {
    const note = (await notesOf(b)).find((n) => n.body === "rear steps out at the fast kink")!;
    expect((await change("driver", b, { intent: "delete-note", noteId: note.id })).status).toBe(403);
    expect((await change("outsider", b, { intent: "delete-note", noteId: note.id })).status).toBe(404);
    // The note exists, but on session b: naming session a does not reach it.
    expect((await change("owner", a, { intent: "delete-note", noteId: note.id })).status).toBe(404);
    expect((await notesOf(b)).some((n) => n.id === note.id)).toBe(true);
    expect((await change("owner", b, { intent: "delete-note", noteId: note.id })).status).toBe(200);
    expect((await notesOf(b)).some((n) => n.id === note.id)).toBe(false);
    const [event] = await events("annotation_deleted");
    expect(event.actorUserId).toBe(w.userIds.owner);
    expect(event.detail).toMatchObject({ ownNote: "no" });
  });
});

describe("the report's write actions per role (access.ts grants)", () => {
  const mayOf = async (who: keyof typeof w.jars) => {
    const out = await outcome(() => page.loader(args(getRequest(`/t/${w.team.slug}/sessions/${a}`, w.jars[who]), { teamSlug: w.team.slug, sessionId: a })));
    return out.body as { may: { reanalyse: boolean; delete: boolean; brief: boolean }; setupChoices: { id: string }[]; history: { results: unknown[]; openJob: unknown } };
  };
  it("owner: re-analyse, delete and Brief link; engineer: re-analyse and Brief link; analyst: none", async () => {
    const owner = await mayOf("owner");
    expect(owner.may).toEqual({ reanalyse: true, delete: true, brief: true });
    expect(owner.setupChoices.map((s) => s.id)).toContain(w.setupId);
    expect((await mayOf("engineer")).may).toEqual({ reanalyse: true, delete: false, brief: true });
    const analyst = await mayOf("analyst");
    expect(analyst.may).toEqual({ reanalyse: false, delete: false, brief: false });
    expect(analyst.setupChoices).toEqual([]);
  });
});

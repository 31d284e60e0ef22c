// Driver brief of a saved comparison (issue 12 item 1: "one session or one saved comparison"): engineers and
// owners make it (analyst, driver 403; another team 404), the link opens without signing in and shows the
// comparison's sessions only (their names, dates and figures; no ids, no other session, nothing else of the
// team), noindex; a session deleted since is left out; the database holds exactly one subject per link.
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import { db } from "~/server/db.server";
import { briefLinks } from "~/db/schema/briefs";
import { auditLog } from "~/db/schema/audit";
import { savedComparisons } from "~/db/schema/report";
import { analysisSessions } from "~/db/schema/sessions";
import { hashBriefToken } from "~/server/brief.server";
import { saveComparison } from "~/server/report/annotations.server";
import { briefHeadline } from "~/lib/brief-words";
import { balanceOverlay } from "~/lib/report/overlay";
import * as briefsPage from "~/routes/brief/briefs";
import * as briefPage from "~/routes/brief/brief";
import * as sharedPage from "~/routes/brief/shared";
import * as dashboard from "~/routes/teams/dashboard";
import { waitForMailTo } from "./helpers/mail";
import { args, formRequest, getRequest, outcome } from "./auth-support";
import { garageWorld, type Who } from "./garage-support";
import { storeDemoSession } from "./report-support";

let w: Awaited<ReturnType<typeof garageWorld>>;
let a: Awaited<ReturnType<typeof storeDemoSession>>;
let b: Awaited<ReturnType<typeof storeDemoSession>>;
let notShared = "";
let comparisonId = "";
let rivalComparisonId = "";
beforeAll(async () => {
  w = await garageWorld();
  a = await storeDemoSession("marlin-comma", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "Kestrel Bank, high wing", sessionDate: "2026-05-16" });
  b = await storeDemoSession("marlin-splitter", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "Kestrel Bank, low splitter", sessionDate: "2026-06-02" });
  notShared = (await storeDemoSession("marlin-semicolon", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "Kestrel Bank, not in the comparison" })).id;
  await saveComparison(w.team.id, w.userIds.analyst, "Splitter against wing", [a.id, b.id]);
  [{ id: comparisonId }] = await db.select({ id: savedComparisons.id }).from(savedComparisons).where(and(eq(savedComparisons.teamId, w.team.id), eq(savedComparisons.name, "Splitter against wing")));
  const rival = await storeDemoSession("marlin-comma", { teamId: w.outsider.teamId, carId: w.rivalCarId, setupId: w.rivalSetupId, name: "Rival stint" });
  await saveComparison(w.outsider.teamId, w.outsider.userId, "Rival comparison", [rival.id, rival.id]);
  [{ id: rivalComparisonId }] = await db.select({ id: savedComparisons.id }).from(savedComparisons).where(eq(savedComparisons.teamId, w.outsider.teamId));
}, 120_000);

const create = (who: Who, fields: Record<string, string>) =>
  outcome(() => briefsPage.action(args(formRequest(`/t/${w.team.slug}/briefs`, { intent: "create", days: "14", note: "", email: "", ...fields }, w.jars[who]), { teamSlug: w.team.slug })));
const tokenOf = (body: unknown) => (body as { link: string }).link.split("/brief/")[1];
const open = (token: string) => outcome(() => briefPage.loader(args(getRequest(`/brief/${token}`), { token })));

type ComparisonBrief = { kind: string; comparisonName: string; note: string; sessions: { name: string; sessionDate: string; summary: { bands: unknown[]; traces?: unknown } }[] };

describe("Brief link to a saved comparison", () => {
  it.each([["analyst", 403], ["driver", 403], ["outsider", 404]] as const)("%s cannot make one (%i)", async (who, status) => {
    expect((await create(who, { subject: `comparison:${comparisonId}` })).status).toBe(status);
  });

  it("another team's comparison is not found (404), a malformed choice is a field message (400)", async () => {
    expect((await create("engineer", { subject: `comparison:${rivalComparisonId}` })).status).toBe(404);
    const bad = await create("engineer", { subject: "team:everything" });
    expect(bad.status).toBe(400);
    expect((bad.body as { errors: Record<string, string> }).errors.subject).toMatch(/Choose a session or a saved comparison/);
  });

  it("opens without signing in: the comparison's sessions with their headlines' figures and the note, nothing else of the team, noindex", async () => {
    const made = await create("engineer", { subject: `comparison:${comparisonId}`, note: "Compare turn 7 in both" });
    expect(made.status).toBe(200);
    const token = tokenOf(made.body);
    const seen = await open(token);
    expect(seen.status).toBe(200);
    const brief = (seen.body as { brief: ComparisonBrief }).brief;
    expect(brief.kind).toBe("comparison");
    expect(brief.comparisonName).toBe("Splitter against wing");
    expect(brief.note).toBe("Compare turn 7 in both");
    expect(brief.sessions.map((x) => [x.name, x.sessionDate])).toEqual([
      ["Kestrel Bank, high wing", "2026-05-16"],
      ["Kestrel Bank, low splitter", "2026-06-02"],
    ]);
    // The figures are the sessions' summaries of record (the engine's output on the demo logs), without traces.
    expect(brief.sessions[0].summary.bands).toEqual(a.summary.bands);
    expect(brief.sessions.every((x) => x.summary.traces === undefined)).toBe(true);
    const text = JSON.stringify(seen.body);
    for (const secret of [w.team.id, w.carId, w.setupId, a.id, b.id, notShared, comparisonId, "Kestrel Bank, not in the comparison", ...Object.values(w.userIds)]) expect(text).not.toContain(secret);
    const headers = (await briefPage.loader(args(getRequest(`/brief/${token}`), { token }))) as { init?: { headers?: Record<string, string> } };
    expect(headers.init?.headers?.["X-Robots-Tag"]).toBe("noindex, nofollow");
    const [row] = await db.select().from(briefLinks).where(eq(briefLinks.tokenHash, hashBriefToken(token)));
    expect([row.sessionId, row.comparisonId, row.viewCount]).toEqual([null, comparisonId, 2]);
    const [created] = await db.select().from(auditLog).where(and(eq(auditLog.subjectId, row.id), eq(auditLog.action, "brief_created")));
    expect(created.detail).toMatchObject({ comparison: "Splitter against wing" });
    console.log("tried: a Brief link to a saved comparison opened without a cookie; held: its two sessions only, no ids, noindex, views counted");
  });

  it("the Brief links page lists it as a comparison and offers the team's saved comparisons", async () => {
    const page = await outcome(() => briefsPage.loader(args(getRequest(`/t/${w.team.slug}/briefs?comparison=${comparisonId}`, w.jars.owner), { teamSlug: w.team.slug })));
    const body = page.body as { preselect: string; comparisons: { id: string; name: string; count: number }[]; briefs: { kind: string; sessionName: string }[] };
    expect(body.preselect).toBe(`comparison:${comparisonId}`);
    expect(body.comparisons).toEqual([{ id: comparisonId, name: "Splitter against wing", count: 2 }]);
    expect(body.briefs.find((x) => x.kind === "comparison")?.sessionName).toBe("Splitter against wing");
  });

  it("sent to the team's driver: the mail names the comparison, their dashboard lists it, and it opens for them there", async () => {
    expect((await create("owner", { subject: `comparison:${comparisonId}`, email: "driver@harrowgate.example", note: "Both runs, turn 7" })).status).toBe(200);
    const mail = await waitForMailTo("driver@harrowgate.example", 15_000);
    expect(mail.subject).toBe("Driver brief: comparison “Splitter against wing”");
    const dash = await outcome(() => dashboard.loader(args(getRequest(`/t/${w.team.slug}`, w.jars.driver), { teamSlug: w.team.slug })));
    const shared = (dash.body as { sharedBriefs: { id: string; sessionName: string }[] }).sharedBriefs;
    const mine = shared.find((x) => x.sessionName === "Splitter against wing");
    expect(mine).toBeDefined();
    const opened = await outcome(() => sharedPage.loader(args(getRequest(`/brief/shared/${mine!.id}`, w.jars.driver), { briefId: mine!.id })));
    expect(opened.status).toBe(200);
    expect((opened.body as { brief: ComparisonBrief }).brief.sessions).toHaveLength(2);
    expect((await outcome(() => sharedPage.loader(args(getRequest(`/brief/shared/${mine!.id}`, w.jars.analyst), { briefId: mine!.id })))).status).toBe(404);
  });

  it("saving the comparison again with another session does not widen a link made before", async () => {
    const token = tokenOf((await create("engineer", { subject: `comparison:${comparisonId}` })).body);
    await saveComparison(w.team.id, w.userIds.analyst, "Splitter against wing", [a.id, notShared]);
    const seen = await open(token);
    expect((seen.body as { brief: ComparisonBrief }).brief.sessions.map((x) => x.name)).toEqual(["Kestrel Bank, high wing", "Kestrel Bank, low splitter"]);
    expect(JSON.stringify(seen.body)).not.toContain("Kestrel Bank, not in the comparison");
    await saveComparison(w.team.id, w.userIds.analyst, "Splitter against wing", [a.id, b.id]);
  });

  it("a session deleted since is left out; with none left the link opens nothing", async () => {
    const token = tokenOf((await create("owner", { subject: `comparison:${comparisonId}` })).body);
    await db.delete(analysisSessions).where(eq(analysisSessions.id, b.id));
    const after = await open(token);
    expect((after.body as { brief: ComparisonBrief }).brief.sessions.map((x) => x.name)).toEqual(["Kestrel Bank, high wing"]);
    await db.delete(analysisSessions).where(eq(analysisSessions.id, a.id));
    expect((await open(token)).status).toBe(404);
  });

  it("the database refuses a link with both subjects or none (check constraint)", async () => {
    const row = { teamId: w.team.id, tokenHash: "0".repeat(64), expiresAt: new Date(Date.now() + 86_400_000) };
    await expect(db.insert(briefLinks).values({ ...row, id: randomUUID(), sessionId: notShared, comparisonId })).rejects.toThrow();
    await expect(db.insert(briefLinks).values({ ...row, id: randomUUID(), tokenHash: "1".repeat(64) })).rejects.toThrow();
  });
});

describe("the comparison brief's words and overlay", () => {
  it("each session's headline follows briefHeadline; the overlay lines up bands by their mid-point", async () => {
    const sessions = [
      { name: "A", sessionDate: null, summary: a.summary },
      { name: "B", sessionDate: null, summary: b.summary },
    ];
    const overlay = balanceOverlay(sessions);
    // Both demo logs use the same band edges, so every x has a value from each session where it has a balance.
    expect(overlay.xs).toEqual(a.summary.bands.map((x) => (x.min_kmh + x.max_kmh) / 2));
    expect(overlay.cols[1]).toEqual(a.summary.bands.map((x) => x.balance_front_pct));
    expect(overlay.cols[2]).toEqual(b.summary.bands.map((x) => x.balance_front_pct));
    expect(overlay.intervals[2]).toEqual(b.summary.bands.map((x) => (x.balance_front_pct === null ? null : x.balance_front_ci95_pct)));
    expect(briefHeadline(a.summary).headline).toMatch(/at high speed/);
  });
});

// Driver brief (issue 12 item 1): a Brief link shows exactly one session, read-only, without signing in;
// ≥128-bit token stored only as a hash, 14-day default expiry, revocation, view count, e-mail, dashboard.
import { beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import { db } from "~/server/db.server";
import { briefLinks } from "~/db/schema/briefs";
import { auditLog } from "~/db/schema/audit";
import { hashBriefToken } from "~/server/brief.server";
import * as briefsPage from "~/routes/brief/briefs";
import * as briefPage from "~/routes/brief/brief";
import * as sharedPage from "~/routes/brief/shared";
import * as dashboard from "~/routes/teams/dashboard";
import { args, formRequest, getRequest, outcome } from "./auth-support";
import { garageWorld, type Who } from "./garage-support";
import { storeDemoSession } from "./report-support";
import { waitForMailTo, firstLink } from "./helpers/mail";

let w: Awaited<ReturnType<typeof garageWorld>>;
let sessionId = "";
let otherSessionId = "";
beforeAll(async () => {
  w = await garageWorld();
  sessionId = (await storeDemoSession("marlin-comma", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "Kestrel Bank, brief stint" })).id;
  otherSessionId = (await storeDemoSession("marlin-semicolon", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "Kestrel Bank, not shared" })).id;
}, 120_000);

function create(who: Who, fields: Record<string, string>) {
  const path = `/t/${w.team.slug}/briefs`;
  return outcome(() => briefsPage.action(args(formRequest(path, { intent: "create", days: "14", note: "", email: "", ...fields }, w.jars[who]), { teamSlug: w.team.slug })));
}

const tokenOf = (link: string) => link.split("/brief/")[1];
const open = (token: string) => outcome(() => briefPage.loader(args(getRequest(`/brief/${token}`), { token })));

describe("Brief links", () => {
  it.each([["analyst", 403], ["driver", 403], ["outsider", 404]] as const)("%s cannot make one (%i)", async (who, status) => {
    expect((await create(who, { sessionId })).status).toBe(status);
  });

  it("an engineer makes a link: 256-bit token shown once, stored only as its hash, 14 days by default", async () => {
    const made = await create("engineer", { sessionId, note: "Turn 4 entry: try 2 clicks more front rebound" });
    expect(made.status).toBe(200);
    const link = (made.body as { link: string }).link;
    const token = tokenOf(link);
    // 32 random bytes in base64url (RFC 4648 §5) are 43 characters: 256 bits ≥ the 128 the issue asks.
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    const [row] = await db.select().from(briefLinks).where(eq(briefLinks.tokenHash, hashBriefToken(token)));
    expect(row).toBeDefined();
    expect(JSON.stringify(row)).not.toContain(token);
    const days = (row.expiresAt.getTime() - row.createdAt.getTime()) / 86_400_000;
    expect(days).toBeCloseTo(14, 2);
    const [event] = await db.select().from(auditLog).where(and(eq(auditLog.subjectId, row.id), eq(auditLog.action, "brief_created")));
    expect(event.actorUserId).toBe(w.userIds.engineer);
  });

  it("the link opens without signing in, noindex, one session only; each view is counted and recorded", async () => {
    const token = tokenOf(((await create("engineer", { sessionId, note: "Only this stint" })).body as { link: string }).link);
    const seen = await open(token);
    expect(seen.status).toBe(200);
    const brief = (seen.body as { brief: { sessionName: string; note: string; summary: unknown } }).brief;
    expect(brief.sessionName).toBe("Kestrel Bank, brief stint");
    expect(brief.note).toBe("Only this stint");
    const text = JSON.stringify(seen.body);
    for (const secret of [w.team.id, w.carId, w.setupId, otherSessionId, sessionId, "Kestrel Bank, not shared", ...Object.values(w.userIds)]) expect(text).not.toContain(secret);
    const headers = (await briefPage.loader(args(getRequest(`/brief/${token}`), { token }))) as { init?: { headers?: Record<string, string> } };
    expect(headers.init?.headers?.["X-Robots-Tag"]).toBe("noindex, nofollow");
    expect(headers.init?.headers?.["Referrer-Policy"]).toBe("no-referrer");
    expect(briefPage.meta({ data: seen.body } as never)).toContainEqual({ name: "robots", content: "noindex, nofollow" });
    const [row] = await db.select().from(briefLinks).where(eq(briefLinks.tokenHash, hashBriefToken(token)));
    expect(row.viewCount).toBe(2);
    expect(row.lastViewedAt).not.toBeNull();
    const views = await db.select().from(auditLog).where(and(eq(auditLog.subjectId, row.id), eq(auditLog.action, "brief_viewed")));
    expect(views.map((v) => v.actorUserId)).toEqual([null, null]);
    console.log("tried: open a Brief link twice without a cookie; held: one session's figures and the note, no team ids, noindex, 2 views recorded");
  });

  it("a revoked, expired, altered or malformed link opens nothing (404)", async () => {
    const token = tokenOf(((await create("owner", { sessionId })).body as { link: string }).link);
    const [row] = await db.select().from(briefLinks).where(eq(briefLinks.tokenHash, hashBriefToken(token)));
    const flipped = token.slice(0, -1) + (token.endsWith("A") ? "B" : "A");
    expect((await open(flipped)).status).toBe(404);
    expect((await open("short")).status).toBe(404);
    const revoked = await outcome(() => briefsPage.action(args(formRequest(`/t/${w.team.slug}/briefs`, { intent: "revoke", briefId: row.id }, w.jars.engineer), { teamSlug: w.team.slug })));
    expect(revoked.status).toBe(200);
    expect((await open(token)).status).toBe(404);
    const token2 = tokenOf(((await create("owner", { sessionId })).body as { link: string }).link);
    await db.update(briefLinks).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(briefLinks.tokenHash, hashBriefToken(token2)));
    expect((await open(token2)).status).toBe(404);
    console.log("tried: altered, malformed, revoked and expired links; held: 404 for each");
  });

  it("sent by e-mail to a driver with an account: the mail carries the link, their dashboard lists it, only they open it there", async () => {
    const made = await create("engineer", { sessionId, email: "driver@harrowgate.example", note: "Read before Saturday" });
    expect(made.status).toBe(200);
    const mail = await waitForMailTo("driver@harrowgate.example", 15_000);
    expect(mail.subject).toBe("Driver brief: Kestrel Bank, brief stint");
    const link = firstLink(mail, (made.body as { link: string }).link.split("/brief/")[0]);
    expect(link).toBe((made.body as { link: string }).link);
    const dash = await outcome(() => dashboard.loader(args(getRequest(`/t/${w.team.slug}`, w.jars.driver), { teamSlug: w.team.slug })));
    const shared = (dash.body as { sharedBriefs: Array<{ id: string; sessionName: string }> }).sharedBriefs;
    expect(shared.map((b) => b.sessionName)).toContain("Kestrel Bank, brief stint");
    const briefId = shared[0].id;
    const mine = await outcome(() => sharedPage.loader(args(getRequest(`/brief/shared/${briefId}`, w.jars.driver), { briefId })));
    expect(mine.status).toBe(200);
    const notMine = await outcome(() => sharedPage.loader(args(getRequest(`/brief/shared/${briefId}`, w.jars.analyst), { briefId })));
    expect(notMine.status).toBe(404);
    console.log("tried: a brief mailed to the team's driver; held: mail with the link, listed on their dashboard, opened by them and refused to the analyst");
  });
});

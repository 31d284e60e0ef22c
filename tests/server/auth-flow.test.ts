// The whole path of a new team, against the real MariaDB and the real SMTP catcher:
// sign-up → confirmation mail → verify → sign in → create a team → invite by mail → accept →
// role limits → another team stays invisible.
import { randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { firstLink, mailCatcherDir, waitForMailTo, waitForMessage } from "./helpers/mail";
import { appUrl, args, authCall, CookieJar, formRequest, getRequest, outcome } from "./auth-support";
import * as verifyRoute from "~/routes/auth/verify";
import * as signInRoute from "~/routes/auth/sign-in";
import * as signUpRoute from "~/routes/auth/sign-up";
import * as newTeamRoute from "~/routes/teams/new";
import * as dashboardRoute from "~/routes/teams/dashboard";
import * as settingsRoute from "~/routes/teams/settings";
import * as invitationRoute from "~/routes/teams/invitation";
import { requireMember, type Permission } from "~/server/permissions.server";
import { pool } from "~/server/db.server";

const run = randomBytes(4).toString("hex");
const PASSWORD = "coldwater-ridge-42";
const owner = { name: "Ilse Markham", email: `owner.${run}@flow.example` };
const analyst = { name: "Ravi Sutcliffe", email: `analyst.${run}@flow.example` };
const driver = { name: "Nell Okafor", email: `driver.${run}@flow.example` };
const rival = { name: "Oskar Venn", email: `rival.${run}@flow.example` };
const teamSlug = `flow-${run}`;
const rivalSlug = `rival-${run}`;

/** Sign up through better-auth's endpoint, open the link from the mail, return the signed-in jar. */
async function signUpAndVerify(person: { name: string; email: string }): Promise<CookieJar> {
  const jar = new CookieJar();
  const signUp = await authCall("/sign-up/email", { json: { ...person, password: PASSWORD }, jar });
  // RFC 9110 §15.3.1: 200 OK for a successful request.
  expect(signUp.status).toBe(200);
  const mail = await waitForMailTo(person.email);
  const link = firstLink(mail, appUrl);
  const verified = await authCall(link.slice(`${appUrl}/api/auth`.length), { jar });
  // RFC 9110 §15.4.3: 302 Found sends the browser on, here to the /verify page.
  expect(verified.status).toBe(302);
  expect(new URL(verified.headers.get("location")!, appUrl).pathname).toBe("/verify");
  return jar;
}

/**
 * The invitee's way in: the invitation mail → the sign-up form with next=/invitations/:id → the
 * confirmation link → back at the invitation → accept.
 */
async function inviteAndAccept(ownerJar: CookieJar, person: { name: string; email: string }, role: string): Promise<CookieJar> {
  const invited = await outcome(() => settingsRoute.action(args(formRequest(`/t/${teamSlug}/settings`, { intent: "invite", email: person.email, role }, ownerJar), { teamSlug })));
  expect(invited.status).toBe(200);
  const invitationMail = await waitForMailToSubject(person.email, /invited you/);
  const invitationPath = new URL(firstLink(invitationMail, appUrl)).pathname;
  const id = invitationPath.split("/").at(-1)!;

  const jar = new CookieJar();
  const signedUp = await outcome(() =>
    signUpRoute.action(args(formRequest("/sign-up", { ...person, password: PASSWORD, confirmPassword: PASSWORD, next: invitationPath }))),
  );
  expect(signedUp.status).toBe(200);
  const confirmation = await waitForMailToSubject(person.email, /Confirm your e-mail/);
  const verified = await authCall(firstLink(confirmation, appUrl).slice(`${appUrl}/api/auth`.length), { jar });
  expect(verified.status).toBe(302);
  const verifyTarget = new URL(verified.headers.get("location")!, appUrl);
  const back = await outcome(() => verifyRoute.loader(args(getRequest(verifyTarget.pathname + verifyTarget.search, jar))));
  expect(back.location).toBe(invitationPath);

  const page = await outcome(() => invitationRoute.loader(args(getRequest(invitationPath, jar), { id })));
  expect((page.body as { state: string; role: string }).state).toBe("open");
  expect((page.body as { role: string }).role).toBe(role);
  const accepted = await outcome(() => invitationRoute.action(args(formRequest(invitationPath, { intent: "accept" }, jar), { id })), jar);
  expect(accepted.status).toBe(302);
  expect(accepted.location).toBe(`/t/${teamSlug}`);
  return jar;
}

function waitForMailToSubject(email: string, subject: RegExp) {
  return waitForMessage(mailCatcherDir, (m) => m.to.includes(email) && subject.test(m.subject));
}

describe("sign-up to team roles", () => {
  let ownerJar: CookieJar;
  let analystJar: CookieJar;
  let driverJar: CookieJar;
  let rivalJar: CookieJar;

  beforeAll(async () => {
    ownerJar = await signUpAndVerify(owner);
  });

  afterAll(async () => {
    await pool.end();
  });

  it("the confirmation mail has a text and an HTML part carrying the same link", async () => {
    const mail = await waitForMailToSubject(owner.email, /Confirm your e-mail/);
    const link = firstLink(mail, appUrl);
    // RFC 2046 §5.1.4 (multipart/alternative): both parts carry the same content.
    expect(mail.text).toContain(link);
    expect(mail.html).toContain(link.replace(/&/g, "&#38;"));
  });

  it("after verification the user is signed in and /verify sends them to team creation", async () => {
    expect(ownerJar.size).toBeGreaterThan(0);
    const result = await outcome(() => verifyRoute.loader(args(getRequest("/verify", ownerJar))));
    expect(result.status).toBe(302);
    expect(result.location).toBe("/teams/new");
  });

  it("signing in through the sign-in form sets an httpOnly, SameSite=Lax session cookie", async () => {
    const result = await outcome(() => signInRoute.action(args(formRequest("/sign-in", { email: owner.email, password: PASSWORD, next: "/teams/new" }))));
    expect(result.status).toBe(302);
    expect(result.location).toBe("/teams/new");
    const cookies = result.response!.headers.getSetCookie();
    const session = cookies.find((c) => c.includes("session_token="));
    // RFC 6265 §4.1.2.6 HttpOnly keeps scripts from reading it; RFC 6265bis §4.1.2.7 SameSite=Lax.
    expect(session).toMatch(/HttpOnly/i);
    expect(session).toMatch(/SameSite=Lax/i);
  });

  it("creates a team and lands on its dashboard as owner", async () => {
    const created = await outcome(() => newTeamRoute.action(args(formRequest("/teams/new", { name: "Flow Test Racing", slug: teamSlug }, ownerJar))));
    expect(created.status).toBe(302);
    expect(created.location).toBe(`/t/${teamSlug}`);
    const dashboard = await outcome(() => dashboardRoute.loader(args(getRequest(`/t/${teamSlug}`, ownerJar), { teamSlug })));
    expect(dashboard.status).toBe(200);
    expect((dashboard.body as { role: string }).role).toBe("owner");
  });

  it("a taken team address is refused with a field message, not an error page", async () => {
    const again = await outcome(() => newTeamRoute.action(args(formRequest("/teams/new", { name: "Copy", slug: teamSlug }, ownerJar))));
    // RFC 9110 §15.5.1: 400 for a request the client must change.
    expect(again.status).toBe(400);
    expect((again.body as { errors: Record<string, string> }).errors.slug).toMatch(/taken/);
  });

  it("an analyst invited by mail joins with the invited role", async () => {
    analystJar = await inviteAndAccept(ownerJar, analyst, "analyst");
    const ctx = await requireMember(getRequest(`/t/${teamSlug}`, analystJar), teamSlug);
    expect(ctx.role).toBe("analyst");
  });

  it("the analyst gets 403 on owner-only actions and the data stays unchanged", async () => {
    const rename = await outcome(() => settingsRoute.action(args(formRequest(`/t/${teamSlug}/settings`, { intent: "rename", name: "Hijacked" }, analystJar), { teamSlug })));
    // RFC 9110 §15.5.4: 403 Forbidden — authenticated, but not allowed.
    expect(rename.status).toBe(403);
    const page = await outcome(() => settingsRoute.loader(args(getRequest(`/t/${teamSlug}/settings`, analystJar), { teamSlug })));
    const settings = page.body as { team: { id: string; name: string }; members: Array<{ memberId: string; email: string; role: string }>; invitations: unknown[] };
    expect(settings.team.name).toBe("Flow Test Racing");
    const ownerRow = settings.members.find((m) => m.email === owner.email)!;
    const demote = await outcome(() => settingsRoute.action(args(formRequest(`/t/${teamSlug}/settings`, { intent: "change-role", memberId: ownerRow.memberId, role: "driver" }, analystJar), { teamSlug })));
    expect(demote.status).toBe(403);
    // The same statements drive better-auth's own endpoint: it refuses the analyst too.
    const direct = await authCall("/organization/update", { json: { organizationId: settings.team.id, data: { name: "Hijacked" } }, jar: analystJar });
    expect(direct.status).toBe(403);
    // Members are readable by everyone in the team; pending invitations only by those who may invite.
    expect(settings.members.length).toBe(2);
    expect(settings.invitations).toEqual([]);
  });

  it("a driver sees the Garage but no session data unless shared", async () => {
    driverJar = await inviteAndAccept(ownerJar, driver, "driver");
    // Issue 4, item 6: analyst and driver read cars and setups.
    const ctx = await requireMember(getRequest(`/t/${teamSlug}`, driverJar), teamSlug, { car: ["read"], setup: ["read"] });
    expect(ctx.role).toBe("driver");
    const unshared: Permission[] = [{ session: ["read"] }, { compare: ["read"] }, { setup: ["update"] }];
    for (const permission of unshared) {
      const refused = await outcome(() => requireMember(getRequest(`/t/${teamSlug}/sessions`, driverJar), teamSlug, permission));
      expect(refused.status).toBe(403);
    }
  });

  it("the owner can change a role, and a bad role is refused with a clear message", async () => {
    const page = await outcome(() => settingsRoute.loader(args(getRequest(`/t/${teamSlug}/settings`, ownerJar), { teamSlug })));
    const members = (page.body as { members: Array<{ memberId: string; email: string }> }).members;
    const driverRow = members.find((m) => m.email === driver.email)!;
    const bad = await outcome(() => settingsRoute.action(args(formRequest(`/t/${teamSlug}/settings`, { intent: "change-role", memberId: driverRow.memberId, role: "pit-boss" }, ownerJar), { teamSlug })));
    expect(bad.status).toBe(400);
    expect((bad.body as { errors: Record<string, string> }).errors.role).toMatch(/owner, engineer, analyst, driver/);
    const good = await outcome(() => settingsRoute.action(args(formRequest(`/t/${teamSlug}/settings`, { intent: "change-role", memberId: driverRow.memberId, role: "engineer" }, ownerJar), { teamSlug })));
    expect(good.status).toBe(200);
    const ctx = await requireMember(getRequest(`/t/${teamSlug}`, driverJar), teamSlug);
    expect(ctx.role).toBe("engineer");
  });

  describe("another team", () => {
    beforeAll(async () => {
      rivalJar = await signUpAndVerify(rival);
      const created = await outcome(() => newTeamRoute.action(args(formRequest("/teams/new", { name: "Rival Motorsport", slug: rivalSlug }, rivalJar))));
      expect(created.status).toBe(302);
    });

    it("answers 404, never 403, for its pages and actions", async () => {
      // RFC 9110 §15.5.5: 404 Not Found — the server does not disclose that the resource exists.
      const dashboard = await outcome(() => dashboardRoute.loader(args(getRequest(`/t/${rivalSlug}`, ownerJar), { teamSlug: rivalSlug })));
      expect(dashboard.status).toBe(404);
      const settings = await outcome(() => settingsRoute.loader(args(getRequest(`/t/${rivalSlug}/settings`, ownerJar), { teamSlug: rivalSlug })));
      expect(settings.status).toBe(404);
      const rename = await outcome(() => settingsRoute.action(args(formRequest(`/t/${rivalSlug}/settings`, { intent: "rename", name: "Taken over" }, ownerJar), { teamSlug: rivalSlug })));
      expect(rename.status).toBe(404);
      const unknown = await outcome(() => dashboardRoute.loader(args(getRequest(`/t/no-such-${run}`, ownerJar), { teamSlug: `no-such-${run}` })));
      expect(unknown.status).toBe(404);
    });

    it("answers resource routes with JSON 404", async () => {
      const api = await outcome(() => requireMember(getRequest(`/api/t/${rivalSlug}/cars`, ownerJar), rivalSlug, { car: ["read"] }));
      expect(api.status).toBe(404);
      expect(api.body).toEqual({ error: expect.stringMatching(/not a member/) });
    });

    it("refuses to act on another team's member through one's own team", async () => {
      const page = await outcome(() => settingsRoute.loader(args(getRequest(`/t/${rivalSlug}/settings`, rivalJar), { teamSlug: rivalSlug })));
      const rivalMember = (page.body as { members: Array<{ memberId: string }> }).members[0];
      const remove = await outcome(() => settingsRoute.action(args(formRequest(`/t/${teamSlug}/settings`, { intent: "remove-member", memberId: rivalMember.memberId }, ownerJar), { teamSlug })));
      expect(remove.status).toBe(404);
      const still = await outcome(() => settingsRoute.loader(args(getRequest(`/t/${rivalSlug}/settings`, rivalJar), { teamSlug: rivalSlug })));
      expect((still.body as { members: unknown[] }).members.length).toBe(1);
    });
  });

  it("signed out, team pages redirect to sign-in with the way back, and resource routes answer 401", async () => {
    const page = await outcome(() => dashboardRoute.loader(args(getRequest(`/t/${teamSlug}`), { teamSlug })));
    expect(page.status).toBe(302);
    expect(page.location).toBe(`/sign-in?next=${encodeURIComponent(`/t/${teamSlug}`)}`);
    // RFC 9110 §15.5.2: 401 Unauthorized when credentials are missing.
    const api = await outcome(() => requireMember(getRequest(`/api/t/${teamSlug}/cars`), teamSlug));
    expect(api.status).toBe(401);
  });
});

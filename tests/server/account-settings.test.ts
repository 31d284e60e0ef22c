// Account page and team settings: changing a password, renaming, inviting and revoking, with the
// specific refusals the forms show.
import { randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { firstLink, mailCatcherDir, waitForMailTo, waitForMessage } from "./helpers/mail";
import { appUrl, args, authCall, CookieJar, formRequest, getRequest, outcome } from "./auth-support";
import * as accountRoute from "~/routes/account/account";
import * as newTeamRoute from "~/routes/teams/new";
import * as settingsRoute from "~/routes/teams/settings";
import * as invitationRoute from "~/routes/teams/invitation";
import * as signOutRoute from "~/routes/auth/sign-out";
import { getSignedIn } from "~/server/session.server";
import { pool } from "~/server/db.server";

const run = randomBytes(4).toString("hex");
const PASSWORD = "coldwater-hairpin-3";
const NEW_PASSWORD = "coldwater-summit-4";
const person = { name: "Wren Abernathy", email: `wren.${run}@account.example` };
const teamSlug = `acct-${run}`;
let jar: CookieJar;
let otherDevice: CookieJar;

type Settings = { team: { name: string }; members: Array<{ memberId: string; email: string; role: string }>; invitations: Array<{ id: string; email: string; role: string }> };
const settingsPage = async () => (await outcome(() => settingsRoute.loader(args(getRequest(`/t/${teamSlug}/settings`, jar), { teamSlug })))).body as Settings;
const settingsPost = (fields: Record<string, string>) => outcome(() => settingsRoute.action(args(formRequest(`/t/${teamSlug}/settings`, fields, jar), { teamSlug })));

beforeAll(async () => {
  jar = new CookieJar();
  expect((await authCall("/sign-up/email", { json: { ...person, password: PASSWORD }, jar })).status).toBe(200);
  const link = firstLink(await waitForMailTo(person.email), appUrl);
  expect((await authCall(link.slice(`${appUrl}/api/auth`.length), { jar })).status).toBe(302);
  otherDevice = new CookieJar();
  expect((await authCall("/sign-in/email", { json: { email: person.email, password: PASSWORD }, jar: otherDevice })).status).toBe(200);
  const created = await outcome(() => newTeamRoute.action(args(formRequest("/teams/new", { name: "Account Test Club", slug: teamSlug }, jar))));
  expect(created.status).toBe(302);
});

afterAll(async () => {
  await pool.end();
});

describe("account", () => {
  it("refuses a wrong current password and keeps the old one", async () => {
    const result = await outcome(() => accountRoute.action(args(formRequest("/account", { intent: "password", currentPassword: "wrong-password-1", password: NEW_PASSWORD, confirmPassword: NEW_PASSWORD }, jar))));
    // RFC 9110 §15.5.1: 400 Bad Request.
    expect(result.status).toBe(400);
    expect((result.body as { errors: Record<string, string> }).errors.currentPassword).toMatch(/current password is wrong/);
    expect((await authCall("/sign-in/email", { json: { email: person.email, password: PASSWORD } })).status).toBe(200);
  });

  it("changes the password, keeps this browser signed in and signs other devices out", async () => {
    const result = await outcome(() => accountRoute.action(args(formRequest("/account", { intent: "password", currentPassword: PASSWORD, password: NEW_PASSWORD, confirmPassword: NEW_PASSWORD }, jar))), jar);
    expect(result.status).toBe(200);
    expect(await getSignedIn(getRequest("/account", jar))).not.toBeNull();
    expect(await getSignedIn(getRequest("/account", otherDevice))).toBeNull();
    expect((await authCall("/sign-in/email", { json: { email: person.email, password: NEW_PASSWORD } })).status).toBe(200);
  });

  it("renames the user and refuses an empty name", async () => {
    const empty = await outcome(() => accountRoute.action(args(formRequest("/account", { intent: "profile", name: "  " }, jar))));
    expect(empty.status).toBe(400);
    expect((empty.body as { errors: Record<string, string> }).errors.name).toMatch(/Enter your name/);
    const saved = await outcome(() => accountRoute.action(args(formRequest("/account", { intent: "profile", name: "Wren A. Abernathy" }, jar))));
    expect(saved.status).toBe(200);
    const page = await outcome(() => accountRoute.loader(args(getRequest("/account", jar))));
    expect((page.body as { user: { name: string } }).user.name).toBe("Wren A. Abernathy");
  });
});

describe("team settings", () => {
  it("renames the team and refuses a one-letter name", async () => {
    const short = await settingsPost({ intent: "rename", name: "A" });
    expect(short.status).toBe(400);
    expect((short.body as { errors: Record<string, string> }).errors.name).toMatch(/too short/);
    expect((await settingsPost({ intent: "rename", name: "Account Test Motor Club" })).status).toBe(200);
    expect((await settingsPage()).team.name).toBe("Account Test Motor Club");
  });

  it("refuses to invite a malformed address or someone who is already a member", async () => {
    const bad = await settingsPost({ intent: "invite", email: "pit-wall", role: "analyst" });
    expect((bad.body as { errors: Record<string, string> }).errors.email).toMatch(/not a valid e-mail address/);
    const self = await settingsPost({ intent: "invite", email: person.email, role: "analyst" });
    expect(self.status).toBe(400);
    expect((self.body as { errors: Record<string, string> }).errors.form).toMatch(/already a member/);
  });

  it("lists a pending invitation until it is revoked; the revoked link no longer opens", async () => {
    const invitee = `invitee.${run}@account.example`;
    expect((await settingsPost({ intent: "invite", email: invitee, role: "engineer" })).status).toBe(200);
    const pending = (await settingsPage()).invitations.find((i) => i.email === invitee);
    expect(pending?.role).toBe("engineer");
    const mail = await waitForMessage(mailCatcherDir, (m) => m.to.includes(invitee));
    expect(firstLink(mail, appUrl)).toBe(`${appUrl}/invitations/${pending!.id}`);

    expect((await settingsPost({ intent: "revoke-invitation", invitationId: pending!.id })).status).toBe(200);
    expect((await settingsPage()).invitations.find((i) => i.email === invitee)).toBeUndefined();
    const page = await outcome(() => invitationRoute.loader(args(getRequest(`/invitations/${pending!.id}`), { id: pending!.id })));
    expect((page.body as { state: string }).state).toBe("closed");
  });

  it("keeps the only owner from demoting or removing themselves", async () => {
    const me = (await settingsPage()).members.find((m) => m.email === person.email)!;
    const demote = await settingsPost({ intent: "change-role", memberId: me.memberId, role: "analyst" });
    expect(demote.status).toBe(400);
    expect((demote.body as { errors: Record<string, string> }).errors.form).toMatch(/only owner/);
    const remove = await settingsPost({ intent: "remove-member", memberId: me.memberId });
    expect((remove.body as { errors: Record<string, string> }).errors.form).toMatch(/cannot remove yourself/);
    expect((await settingsPage()).members.find((m) => m.email === person.email)?.role).toBe("owner");
  });

  it("an unknown intent is refused without changing anything", async () => {
    const result = await settingsPost({ intent: "delete-everything" });
    // Checked like an owner-only action first, then refused as unknown input.
    expect(result.status).toBe(400);
    expect((await settingsPage()).members.length).toBe(1);
  });
});

describe("sign-out", () => {
  it("ends the session on POST and ignores GET", async () => {
    const viaGet = await outcome(() => signOutRoute.loader());
    expect(viaGet.status).toBe(302);
    expect(await getSignedIn(getRequest("/", jar))).not.toBeNull();
    const out = await outcome(() => signOutRoute.action(args(formRequest("/sign-out", {}, jar))), jar);
    expect(out.status).toBe(302);
    expect(out.location).toBe("/");
    expect(await getSignedIn(getRequest("/", jar))).toBeNull();
  });
});

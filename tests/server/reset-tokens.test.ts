// The probe: after a successful reset, an older reset link still worked. Every reset link of a user now
// dies when any of them is used, and when the password is changed on the account page.
import { randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { firstLink, mailCatcherDir, listMessages, waitForMailTo, waitForMessage } from "./helpers/mail";
import { appUrl, args, authCall, CookieJar, formRequest, outcome } from "./auth-support";
import * as forgotRoute from "~/routes/auth/forgot-password";
import * as resetRoute from "~/routes/auth/reset-password";
import * as accountRoute from "~/routes/account/account";
import { pool } from "~/server/db.server";

const run = randomBytes(4).toString("hex");
const person = { name: "Isla Fenwick", email: `isla.${run}@reset.example` };
const PASSWORDS = ["fenwick-stint-01", "fenwick-stint-02", "fenwick-stint-03", "fenwick-stint-04"];

const resetMails = () => listMessages(mailCatcherDir).filter((m) => m.to.includes(person.email) && /Reset your/.test(m.subject));

/** Asks for a reset and returns the token of the mail it sends (the mail goes out after the answer). */
async function askForReset(): Promise<string> {
  const before = resetMails().length;
  const asked = await outcome(() => forgotRoute.action(args(formRequest("/forgot-password", { email: person.email }))));
  expect(asked.status).toBe(200);
  const mail = await waitForMessage(mailCatcherDir, () => resetMails().length > before);
  const latest = resetMails().at(-1) ?? mail;
  return new URL(firstLink(latest, appUrl)).searchParams.get("token")!;
}

const reset = (token: string, password: string) =>
  outcome(() => resetRoute.action(args(formRequest("/reset-password", { token, password, confirmPassword: password }))));

beforeAll(async () => {
  const jar = new CookieJar();
  expect((await authCall("/sign-up/email", { json: { ...person, password: PASSWORDS[0] }, jar })).status).toBe(200);
  const link = firstLink(await waitForMailTo(person.email), appUrl);
  expect((await authCall(link.slice(`${appUrl}/api/auth`.length), { jar })).status).toBe(302);
});

afterAll(async () => {
  await pool.end();
});

describe("reset links", () => {
  it("all stop working once one of them has set a new password", async () => {
    const first = await askForReset();
    const second = await askForReset();
    expect(first).not.toBe(second);
    expect((await reset(second, PASSWORDS[1])).location).toBe("/sign-in?reset=1");
    const older = await reset(first, PASSWORDS[2]);
    // RFC 9110 §15.5.1: 400; the form says the link is no longer valid.
    expect(older.status).toBe(400);
    expect((older.body as { errors: { form: string } }).errors.form).toMatch(/invalid or has expired/);
  });

  it("stop working when the password is changed on the account page", async () => {
    const pending = await askForReset();
    const jar = new CookieJar();
    expect((await authCall("/sign-in/email", { json: { email: person.email, password: PASSWORDS[1] }, jar })).status).toBe(200);
    const changed = await outcome(() =>
      accountRoute.action(args(formRequest("/account", { intent: "password", currentPassword: PASSWORDS[1], password: PASSWORDS[2], confirmPassword: PASSWORDS[2] }, jar))),
    );
    expect(changed.status).toBe(200);
    expect((changed.body as { done: string }).done).toMatch(/Password changed/);
    const stale = await reset(pending, PASSWORDS[3]);
    expect(stale.status).toBe(400);
    // The changed password is the one that works.
    expect((await authCall("/sign-in/email", { json: { email: person.email, password: PASSWORDS[2] } })).status).toBe(200);
  });
});

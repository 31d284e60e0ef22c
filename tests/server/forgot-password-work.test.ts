// The probe: "forgot password" answered in 135 ms for a known address and in 16 ms for an unknown one,
// because the known path waited for the SMTP server. The answer now waits on nothing that depends on the
// address. This file points SMTP at a server of its own that holds every message until the test lets it
// go: if the answer waited for the mail, it would never come.
import { randomBytes } from "node:crypto";
import { SMTPServer } from "smtp-server";
import { afterAll, beforeAll, describe, expect, it } from "vitest";

let release: () => void = () => undefined;
const held = new Promise<void>((resolve) => (release = resolve));
const received: string[] = [];
const smtp = new SMTPServer({
  authOptional: true,
  disabledCommands: ["STARTTLS"],
  onData(stream, session, callback) {
    stream.resume();
    stream.on("end", () => {
      received.push(...session.envelope.rcptTo.map((r) => r.address));
      held.then(() => callback());
    });
  },
});
await new Promise<void>((resolve) => smtp.listen(0, "127.0.0.1", resolve));
const port = (smtp.server.address() as { port: number }).port;
const savedSmtp = process.env.SMTP_URL;
process.env.SMTP_URL = `smtp://127.0.0.1:${port}`;

const { args, formRequest, outcome } = await import("./auth-support");
const forgotRoute = await import("~/routes/auth/forgot-password");
const { db, pool } = await import("~/server/db.server");
const { user, account } = await import("~/db/schema/auth");
const { hashPassword } = await import("better-auth/crypto");

const run = randomBytes(4).toString("hex");
const known = `known.${run}@timing.example`;
const unknown = `nobody.${run}@timing.example`;

beforeAll(async () => {
  const id = `timing-${run}`;
  const now = new Date();
  await db.insert(user).values({ id, email: known, name: "Known Person", emailVerified: true, createdAt: now, updatedAt: now });
  await db.insert(account).values({ id: `acct-${run}`, accountId: id, providerId: "credential", userId: id, password: await hashPassword("timing-paddock-1"), createdAt: now, updatedAt: now });
});

afterAll(async () => {
  release();
  await new Promise<void>((resolve) => smtp.close(() => resolve()));
  process.env.SMTP_URL = savedSmtp;
  await pool.end();
});

const ask = (email: string) => outcome(() => forgotRoute.action(args(formRequest("/forgot-password", { email }))));

describe("forgot password", () => {
  it("answers a known address the same way as an unknown one, without waiting for the mail", async () => {
    const forKnown = await ask(known);
    const forUnknown = await ask(unknown);
    expect(forKnown.status).toBe(200);
    expect(forUnknown.status).toBe(200);
    // The same page for both: only the address typed differs.
    expect(forKnown.body).toEqual({ errors: {}, sentTo: known });
    expect(forUnknown.body).toEqual({ errors: {}, sentTo: unknown });
    // Both answers are here while the SMTP server still holds the mail for the known address.
    for (let i = 0; i < 100 && !received.includes(known); i++) await new Promise((r) => setTimeout(r, 50));
    expect(received).toContain(known);
    expect(received).not.toContain(unknown);
    release();
  });
});

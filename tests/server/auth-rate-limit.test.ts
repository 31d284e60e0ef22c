// The sign-in form goes through better-auth's rate limiter, one bucket per client address taken from
// CLIENT_IP_HEADER. The test run normally switches the limiter off (AUTH_RATE_LIMIT=off); this file
// switches it on for its own module graph before the app modules load.
import { randomBytes } from "node:crypto";
import { afterAll, describe, expect, it } from "vitest";

const saved = { limit: process.env.AUTH_RATE_LIMIT, header: process.env.CLIENT_IP_HEADER };
process.env.AUTH_RATE_LIMIT = "on";
process.env.CLIENT_IP_HEADER = "x-forwarded-for";

const { args, outcome, appUrl } = await import("./auth-support");
const signInRoute = await import("~/routes/auth/sign-in");
const { pool } = await import("~/server/db.server");

function attempt(email: string, ip: string) {
  const request = new Request(`${appUrl}/sign-in`, {
    method: "POST",
    headers: { origin: appUrl, "content-type": "application/x-www-form-urlencoded", "x-forwarded-for": ip },
    body: new URLSearchParams({ email, password: "not-the-password" }),
  });
  return outcome(() => signInRoute.action(args(request)));
}

describe("sign-in rate limit", () => {
  const email = `limit.${randomBytes(4).toString("hex")}@flow.example`;

  afterAll(async () => {
    process.env.AUTH_RATE_LIMIT = saved.limit;
    process.env.CLIENT_IP_HEADER = saved.header;
    await pool.end();
  });

  it("refuses a fourth quick attempt from one address and says to wait, while another address still gets through", async () => {
    // RFC 5737 §3: 203.0.113.0/24 is reserved for documentation, so these are nobody's addresses.
    // better-auth docs, "Rate Limit": sign-in endpoints allow 3 requests per 10 s by default (from memory).
    const first = [];
    for (let i = 0; i < 3; i++) first.push(await attempt(email, "203.0.113.7"));
    for (const result of first) expect((result.body as { errors: { form: string } }).errors.form).toMatch(/Wrong password/);
    const fourth = await attempt(email, "203.0.113.7");
    // RFC 6585 §4: 429 Too Many Requests.
    expect(fourth.status).toBe(429);
    expect((fourth.body as { errors: { form: string } }).errors.form).toMatch(/Too many attempts/);
    const other = await attempt(email, "203.0.113.8");
    expect((other.body as { errors: { form: string } }).errors.form).toMatch(/Wrong password/);
  });
});

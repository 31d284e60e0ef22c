// Sign-in guesses are rate limited per client, and the client is the socket's peer address (which
// scripts/serve.mjs passes in the load context). A forwarded-for header counts only from a trusted proxy.
// The test run normally switches the limiter off (AUTH_RATE_LIMIT=off); this file switches it on, with
// 127.0.0.1 as the one trusted proxy, for its own module graph before the app modules load.
import { randomBytes } from "node:crypto";
import { afterAll, describe, expect, it } from "vitest";

const saved = { limit: process.env.AUTH_RATE_LIMIT, header: process.env.CLIENT_IP_HEADER, proxies: process.env.TRUSTED_PROXIES };
process.env.AUTH_RATE_LIMIT = "on";
process.env.CLIENT_IP_HEADER = "x-forwarded-for";
process.env.TRUSTED_PROXIES = "127.0.0.1";

const { outcome, appUrl } = await import("./auth-support");
const signInRoute = await import("~/routes/auth/sign-in");
const authRoute = await import("~/routes/api/auth");
const { pool } = await import("~/server/db.server");

// RFC 5737 §3: 192.0.2.0/24, 198.51.100.0/24 and 203.0.113.0/24 are documentation ranges: nobody's addresses.
function attempt(email: string, peer: string, forwardedFor?: string) {
  const headers: Record<string, string> = { origin: appUrl, "content-type": "application/x-www-form-urlencoded" };
  if (forwardedFor) headers["x-forwarded-for"] = forwardedFor;
  const request = new Request(`${appUrl}/sign-in`, { method: "POST", headers, body: new URLSearchParams({ email, password: "not-the-password" }) });
  return outcome(() => signInRoute.action({ request, params: {}, context: { peerAddress: peer } } as never));
}

const formError = (o: { body: unknown }) => (o.body as { errors: { form: string } }).errors.form;

describe("sign-in rate limit", () => {
  const email = `limit.${randomBytes(4).toString("hex")}@flow.example`;

  afterAll(async () => {
    process.env.AUTH_RATE_LIMIT = saved.limit;
    process.env.CLIENT_IP_HEADER = saved.header;
    process.env.TRUSTED_PROXIES = saved.proxies;
    await pool.end();
  });

  it("holds a client that sends a new X-Forwarded-For with every guess to the limit", async () => {
    // better-auth docs, "Rate Limit": sign-in endpoints allow 3 requests per 10 s by default (from memory).
    for (let i = 1; i <= 3; i++) expect(formError(await attempt(email, "203.0.113.7", `198.51.100.${i}`))).toMatch(/Wrong password/);
    const fourth = await attempt(email, "203.0.113.7", "198.51.100.99");
    // RFC 6585 §4: 429 Too Many Requests.
    expect(fourth.status).toBe(429);
    expect(formError(fourth)).toMatch(/Too many attempts/);
  });

  it("keeps clients at different addresses apart: three bad tries do not lock everyone out", async () => {
    for (let i = 0; i < 3; i++) await attempt(email, "203.0.113.20");
    expect((await attempt(email, "203.0.113.20")).status).toBe(429);
    const other = await attempt(email, "203.0.113.21");
    expect(other.status).toBe(400);
    expect(formError(other)).toMatch(/Wrong password/);
  });

  it("behind a trusted proxy, counts the address the proxy names", async () => {
    for (let i = 0; i < 3; i++) await attempt(email, "127.0.0.1", "198.51.100.40");
    expect((await attempt(email, "127.0.0.1", "198.51.100.40")).status).toBe(429);
    expect(formError(await attempt(email, "127.0.0.1", "198.51.100.41"))).toMatch(/Wrong password/);
  });

  it("applies the same rule to better-auth's JSON sign-in at /api/auth", async () => {
    const call = (forwardedFor: string) =>
      authRoute.action({
        request: new Request(`${appUrl}/api/auth/sign-in/email`, {
          method: "POST",
          headers: { origin: appUrl, "content-type": "application/json", "x-forwarded-for": forwardedFor },
          body: JSON.stringify({ email, password: "not-the-password" }),
        }),
        params: {},
        context: { peerAddress: "203.0.113.50" },
      } as never) as Promise<Response>;
    const statuses = [];
    for (let i = 1; i <= 4; i++) statuses.push((await call(`192.0.2.${i}`)).status);
    // RFC 9110 §15.5.2: 401 for the wrong password; RFC 6585 §4: 429 once the client's bucket is empty.
    expect(statuses).toEqual([401, 401, 401, 429]);
  });
});

// The probe: /sign-in?next=/%09/host/path sent a signed-in browser to another host (WHATWG URL Standard:
// tab and newline are removed while parsing, so "/\t/host" becomes "//host"), and next=/%0a/x gave a 500.
// Every page that follows `next` must answer with a path on this site.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, args, authCall, CookieJar, formRequest, getRequest, outcome } from "./auth-support";
import * as signInRoute from "~/routes/auth/sign-in";
import * as signUpRoute from "~/routes/auth/sign-up";
import * as verifyRoute from "~/routes/auth/verify";
import { DEMO_PASSWORD, DEMO_USERS, seedUsers } from "~/server/seed/users.server";
import { pool } from "~/server/db.server";

const HOSTILE = ["/%09/evil.example/path", "/%0a/x", "/%0d%0a/evil.example", "/%5Cevil.example", "//evil.example", "https://evil.example/"];

/** A Location stays on this site when, resolved against the app, its origin is the app's. */
function staysHere(location: string | null): boolean {
  return location !== null && new URL(location, appUrl).origin === new URL(appUrl).origin && !/[\t\r\n]/.test(location);
}

describe("next= after sign-in, sign-up and e-mail confirmation", () => {
  let jar: CookieJar;

  beforeAll(async () => {
    await seedUsers();
    jar = new CookieJar();
    const owner = DEMO_USERS.find((u) => u.role === "owner")!;
    expect((await authCall("/sign-in/email", { json: { email: owner.email, password: DEMO_PASSWORD }, jar })).status).toBe(200);
  });

  afterAll(async () => {
    await pool.end();
  });

  it("never redirects a signed-in browser off-site from /sign-in, /sign-up or /verify, and never fails", async () => {
    for (const next of HOSTILE) {
      for (const [page, route] of [["/sign-in", signInRoute], ["/sign-up", signUpRoute], ["/verify", verifyRoute]] as const) {
        const result = await outcome(() => route.loader(args(getRequest(`${page}?next=${next}`, jar))));
        // RFC 9110 §15.4: a 3xx answer; the probe saw the browser leave for evil.example.
        expect(result.status, `${page}?next=${next}`).toBe(302);
        expect(staysHere(result.location), `${page}?next=${next} → ${result.location}`).toBe(true);
      }
    }
  });

  it("drops a hostile next= from the signed-out sign-in and sign-up pages", async () => {
    for (const next of HOSTILE) {
      const signIn = await outcome(() => signInRoute.loader(args(getRequest(`/sign-in?next=${next}`))));
      expect((signIn.body as { next: string }).next).toBe("");
      const signUp = await outcome(() => signUpRoute.loader(args(getRequest(`/sign-up?next=${next}`))));
      expect((signUp.body as { next: string }).next).toBe("");
    }
  });

  it("sends the sign-in form's next field only to a path on this site", async () => {
    const owner = DEMO_USERS.find((u) => u.role === "owner")!;
    for (const next of ["/\t/evil.example/path", "/\n/x", "/\\evil.example"]) {
      const result = await outcome(() => signInRoute.action(args(formRequest("/sign-in", { email: owner.email, password: DEMO_PASSWORD, next }))));
      expect(result.status).toBe(302);
      expect(staysHere(result.location), `${JSON.stringify(next)} → ${result.location}`).toBe(true);
    }
    const kept = await outcome(() => signInRoute.action(args(formRequest("/sign-in", { email: owner.email, password: DEMO_PASSWORD, next: "/t/harrowgate/garage" }))));
    expect(kept.location).toBe("/t/harrowgate/garage");
  });
});

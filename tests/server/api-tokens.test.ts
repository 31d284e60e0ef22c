// API tokens (POST/GET /api/tokens, DELETE /api/tokens/:id, the account page) and requireApiAccess:
// the token is shown once and stored only as a hash; a token acts for its one team; 401 without one.
import { createHash, randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { apiTokens } from "~/db/schema/api-tokens";
import { auditLog } from "~/db/schema/audit";
import { member } from "~/db/schema/auth";
import { db } from "~/server/db.server";
import { requireApiAccess } from "~/server/api-access.server";
import * as tokensRoute from "~/routes/api/tokens";
import * as tokenRoute from "~/routes/api/token";
import * as accountRoute from "~/routes/account/account";
import { appUrl, args, formRequest, getRequest, outcome, type CookieJar } from "./auth-support";
import { garageWorld } from "./garage-support";

let w: Awaited<ReturnType<typeof garageWorld>>;
beforeAll(async () => {
  w = await garageWorld();
});

function jsonRequest(path: string, method: string, body: unknown, jar?: CookieJar, extra: Record<string, string> = {}): Request {
  const headers = new Headers({ origin: appUrl, "content-type": "application/json", ...extra });
  if (jar) headers.set("cookie", jar.header());
  return new Request(`${appUrl}${path}`, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) });
}

async function makeToken(jar: CookieJar, team: string, name = "Pit laptop") {
  return outcome(() => tokensRoute.action(args(jsonRequest("/api/tokens", "POST", { name, team }, jar))));
}

function bearer(token: string, path = "/api/sessions"): Request {
  return new Request(`${appUrl}${path}`, { headers: { authorization: `Bearer ${token}` } });
}

describe("POST/GET /api/tokens and DELETE /api/tokens/:id", () => {
  it("makes a token shown once, stores only its SHA-256, lists it without the secret and revokes it", async () => {
    const made = await makeToken(w.jars.engineer, w.team.slug);
    expect(made.status).toBe(201);
    const { id, token } = made.body as { id: string; token: string };
    expect(token).toMatch(/^rkl_[A-Za-z0-9_-]{43}$/);
    const [row] = await db.select().from(apiTokens).where(eq(apiTokens.id, id));
    expect(row.tokenHash).toBe(createHash("sha256").update(token).digest("hex"));
    expect(Object.values(row).some((v) => v === token)).toBe(false);

    const list = await outcome(() => tokensRoute.loader(args(getRequest("/api/tokens", w.jars.engineer))));
    expect(list.status).toBe(200);
    const listed = (list.body as { tokens: Array<{ id: string; team: { slug: string } }> }).tokens.find((t) => t.id === id);
    expect(listed?.team.slug).toBe(w.team.slug);
    expect(JSON.stringify(list.body)).not.toContain(token);

    const access = await requireApiAccess(bearer(token));
    expect(access).toMatchObject({ teamId: w.team.id, teamSlug: w.team.slug, role: "engineer", via: "token" });

    // Another user cannot revoke it (404, not 403: its existence is not revealed).
    expect((await outcome(() => tokenRoute.action(args(jsonRequest(`/api/tokens/${id}`, "DELETE", undefined, w.jars.analyst), { id })))).status).toBe(404);
    const revoked = await outcome(() => tokenRoute.action(args(jsonRequest(`/api/tokens/${id}`, "DELETE", undefined, w.jars.engineer), { id })));
    expect(revoked.status).toBe(204);
    expect((await outcome(() => requireApiAccess(bearer(token)))).status).toBe(401);
    const events = await db.select().from(auditLog).where(eq(auditLog.subjectId, id));
    expect(events.map((e) => e.action).sort()).toEqual(["api_token_created", "api_token_revoked"]);
  });

  it("refuses a team the user is not in (404), a missing name (400), no session (401) and a token making tokens (401)", async () => {
    expect((await makeToken(w.jars.engineer, w.outsider.teamSlug)).status).toBe(404);
    const noName = await outcome(() => tokensRoute.action(args(jsonRequest("/api/tokens", "POST", { team: w.team.slug }, w.jars.engineer))));
    expect(noName.status).toBe(400);
    expect((noName.body as { fields: Record<string, string> }).fields.name).toMatch(/name/);
    const anonymous = await outcome(() => tokensRoute.action(args(jsonRequest("/api/tokens", "POST", { name: "x", team: w.team.slug }))));
    expect(anonymous.status).toBe(401);
    const { token } = (await makeToken(w.jars.owner, w.team.slug)).body as { token: string };
    const viaToken = await outcome(() => tokensRoute.action(args(jsonRequest("/api/tokens", "POST", { name: "x", team: w.team.slug }, undefined, { authorization: `Bearer ${token}` }))));
    expect(viaToken.status).toBe(401);
  });
});

describe("requireApiAccess", () => {
  it("401 without a token or session, and for a malformed or unknown token", async () => {
    for (const request of [getRequest("/api/sessions"), bearer("not-a-token"), bearer(`rkl_${"A".repeat(43)}`), new Request(`${appUrl}/api/sessions`, { headers: { authorization: "Basic abc" } })]) {
      const result = await outcome(() => requireApiAccess(request));
      expect(result.status).toBe(401);
      expect((result.body as { error: string }).error).toBeTruthy();
    }
  });

  it("a token works for its own team only: naming another team is 404", async () => {
    const { token } = (await makeToken(w.jars.owner, w.team.slug)).body as { token: string };
    expect((await outcome(() => requireApiAccess(bearer(token), undefined, { teamSlug: w.outsider.teamSlug }))).status).toBe(404);
    expect((await outcome(() => requireApiAccess(bearer(token, `/api/sessions?team=${w.outsider.teamSlug}`)))).status).toBe(404);
    expect((await requireApiAccess(bearer(token), undefined, { teamSlug: w.team.slug })).role).toBe("owner");
  });

  it("a token stops working when its owner leaves the team", async () => {
    const { token } = (await makeToken(w.jars.analyst, w.team.slug)).body as { token: string };
    expect((await requireApiAccess(bearer(token))).role).toBe("analyst");
    const [m] = await db.select().from(member).where(eq(member.userId, w.userIds.analyst));
    await db.delete(member).where(eq(member.id, m.id));
    try {
      expect((await outcome(() => requireApiAccess(bearer(token)))).status).toBe(401);
    } finally {
      await db.insert(member).values(m);
    }
  });

  it("a cookie picks the only team, the named team, 404 for a team not the user's, 400 for several teams unnamed", async () => {
    expect(await requireApiAccess(getRequest("/api/sessions", w.jars.outsider))).toMatchObject({ teamSlug: w.outsider.teamSlug, via: "cookie", role: "owner" });
    expect((await outcome(() => requireApiAccess(getRequest(`/api/sessions?team=${w.team.slug}`, w.jars.outsider)))).status).toBe(404);
    // The outsider joins the demo team too: now the team must be named.
    const joined = { id: randomUUID(), organizationId: w.team.id, userId: w.outsider.userId, role: "analyst", createdAt: new Date() };
    await db.insert(member).values(joined);
    try {
      const several = await outcome(() => requireApiAccess(getRequest("/api/sessions", w.jars.outsider)));
      expect(several.status).toBe(400);
      expect((several.body as { error: string }).error).toContain(w.team.slug);
      expect(await requireApiAccess(getRequest(`/api/sessions?team=${w.team.slug}`, w.jars.outsider))).toMatchObject({ teamId: w.team.id, role: "analyst" });
    } finally {
      await db.delete(member).where(eq(member.id, joined.id));
    }
  });

  it("403 when the role lacks the permission asked for", async () => {
    const { token } = (await makeToken(w.jars.driver, w.team.slug)).body as { token: string };
    expect((await outcome(() => requireApiAccess(bearer(token), undefined, { permission: { session: ["upload"] } }))).status).toBe(403);
  });
});

describe("account page: API tokens", () => {
  it("makes a token (shown once in the answer), lists it and revokes it", async () => {
    const made = await outcome(() => accountRoute.action(args(formRequest("/account", { intent: "token-create", name: "Timing stand", team: w.team.slug }, w.jars.engineer))));
    expect(made.status).toBe(200);
    const token = (made.body as { token: string }).token;
    expect((await requireApiAccess(bearer(token))).teamId).toBe(w.team.id);
    const page = await outcome(() => accountRoute.loader(args(getRequest("/account", w.jars.engineer))));
    const listed = (page.body as { tokens: Array<{ id: string; name: string }> }).tokens.find((t) => t.name === "Timing stand");
    expect(JSON.stringify(page.body)).not.toContain(token);
    const revoked = await outcome(() => accountRoute.action(args(formRequest("/account", { intent: "token-revoke", tokenId: listed!.id }, w.jars.engineer))));
    expect(revoked.status).toBe(200);
    expect((await outcome(() => requireApiAccess(bearer(token)))).status).toBe(401);
    const empty = await outcome(() => accountRoute.action(args(formRequest("/account", { intent: "token-create", name: " ", team: w.team.slug }, w.jars.engineer))));
    expect(empty.status).toBe(400);
  });
});

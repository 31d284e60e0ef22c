// The demo seed runs on every start: it must add only what is missing and never change stored rows.
import { and, eq, inArray, sql } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { args, formRequest, outcome } from "./auth-support";
import { member, organization, user } from "~/db/schema/auth";
import * as signInRoute from "~/routes/auth/sign-in";
import { db, pool } from "~/server/db.server";
import { DEMO_PASSWORD, DEMO_TEAM, DEMO_USERS, seedUsers } from "~/server/seed/users.server";
import { seedDemo } from "~/server/seed/index.server";

const emails = DEMO_USERS.map((u) => u.email);
const count = async () => {
  const [users] = await db.select({ n: sql<number>`count(*)` }).from(user).where(inArray(user.email, emails));
  const [teams] = await db.select({ n: sql<number>`count(*)` }).from(organization).where(eq(organization.slug, DEMO_TEAM.slug));
  const [members] = await db
    .select({ n: sql<number>`count(*)` })
    .from(member)
    .innerJoin(organization, eq(member.organizationId, organization.id))
    .where(eq(organization.slug, DEMO_TEAM.slug));
  return { users: Number(users.n), teams: Number(teams.n), members: Number(members.n) };
};

afterAll(async () => {
  await pool.end();
});

describe("demo seed", () => {
  it("creates the four demo people in Harrowgate Motor Club, once (idempotent seeding: common practice)", async () => {
    await seedDemo();
    const first = await count();
    expect(first.users).toBe(4);
    expect(first.teams).toBe(1);
    expect(first.members).toBeGreaterThanOrEqual(4);
    await seedDemo();
    expect(await count()).toEqual(first);
  });

  it("keeps a renamed user and a changed role as they are", async () => {
    const { teamId, userIds } = await seedUsers();
    const [before] = await db.select().from(user).where(eq(user.id, userIds.analyst));
    await db.update(user).set({ name: "Renamed in the app" }).where(eq(user.id, userIds.analyst));
    await db.update(member).set({ role: "engineer" }).where(and(eq(member.organizationId, teamId), eq(member.userId, userIds.analyst)));
    try {
      await seedDemo();
      const [after] = await db.select().from(user).where(eq(user.id, userIds.analyst));
      const [membership] = await db.select().from(member).where(and(eq(member.organizationId, teamId), eq(member.userId, userIds.analyst)));
      expect(after.name).toBe("Renamed in the app");
      expect(membership.role).toBe("engineer");
    } finally {
      await db.update(user).set({ name: before.name }).where(eq(user.id, userIds.analyst));
      await db.update(member).set({ role: "analyst" }).where(and(eq(member.organizationId, teamId), eq(member.userId, userIds.analyst)));
    }
  });

  it("lets the demo owner sign in with the printed password and start at the team", async () => {
    const result = await outcome(() => signInRoute.action(args(formRequest("/sign-in", { email: "demo@harrowgate.example", password: DEMO_PASSWORD }))));
    // RFC 9110 §15.4.3: 302 Found after a successful form post.
    expect(result.status).toBe(302);
    expect(result.response!.headers.getSetCookie().some((c) => c.includes("session_token="))).toBe(true);
  });
});

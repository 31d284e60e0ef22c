import { randomUUID } from "node:crypto";
import { hashPassword } from "better-auth/crypto";
import { and, eq } from "drizzle-orm";
import type { Role } from "../../lib/access";
import { db } from "../db.server";
import { account, member, organization, user } from "../../db/schema/auth";

// The invented demo scenario: Harrowgate Motor Club and four people with one role each.
export const DEMO_PASSWORD = "kestrel-bank-2026";
export const DEMO_TEAM = { name: "Harrowgate Motor Club", slug: "harrowgate" } as const;

export const DEMO_USERS: ReadonlyArray<{ email: string; name: string; role: Role }> = [
  { email: "demo@harrowgate.example", name: "Morven Ashdale", role: "owner" },
  { email: "engineer@harrowgate.example", name: "Tobias Rennick", role: "engineer" },
  { email: "analyst@harrowgate.example", name: "Priya Holloway", role: "analyst" },
  { email: "driver@harrowgate.example", name: "Callum Brierley", role: "driver" },
];

/** Creates a verified e-mail/password user unless the address exists; never changes an existing row. */
async function ensureUser(email: string, name: string): Promise<string> {
  const [existing] = await db.select({ id: user.id }).from(user).where(eq(user.email, email)).limit(1);
  if (existing) return existing.id;
  const id = randomUUID();
  const now = new Date();
  await db.insert(user).values({ id, email, name, emailVerified: true, createdAt: now, updatedAt: now });
  await db.insert(account).values({
    id: randomUUID(),
    accountId: id,
    providerId: "credential",
    userId: id,
    password: await hashPassword(DEMO_PASSWORD),
    createdAt: now,
    updatedAt: now,
  });
  return id;
}

async function ensureTeam(): Promise<string> {
  const [existing] = await db.select({ id: organization.id }).from(organization).where(eq(organization.slug, DEMO_TEAM.slug)).limit(1);
  if (existing) return existing.id;
  const id = randomUUID();
  await db.insert(organization).values({ id, name: DEMO_TEAM.name, slug: DEMO_TEAM.slug, createdAt: new Date() });
  return id;
}

async function ensureMember(teamId: string, userId: string, role: Role): Promise<void> {
  const [existing] = await db
    .select({ id: member.id })
    .from(member)
    .where(and(eq(member.organizationId, teamId), eq(member.userId, userId)))
    .limit(1);
  if (existing) return; // a role changed in the app stays changed
  await db.insert(member).values({ id: randomUUID(), organizationId: teamId, userId, role, createdAt: new Date() });
}

export async function seedUsers(): Promise<{ teamId: string; userIds: Record<Role, string> }> {
  const teamId = await ensureTeam();
  const userIds = {} as Record<Role, string>;
  for (const demo of DEMO_USERS) {
    const id = await ensureUser(demo.email, demo.name);
    await ensureMember(teamId, id, demo.role);
    userIds[demo.role] = id;
  }
  return { teamId, userIds };
}

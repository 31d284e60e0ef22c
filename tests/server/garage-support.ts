// Garage integration tests: the demo team with its four roles, a rival team with its own car, and
// signed-in cookie jars for each, all against the real MariaDB (DATABASE_URL).
import { randomBytes, randomUUID } from "node:crypto";
import { hashPassword } from "better-auth/crypto";
import { eq } from "drizzle-orm";
import { db } from "~/server/db.server";
import { account, member, organization, user } from "~/db/schema/auth";
import { DEMO_PASSWORD, DEMO_USERS, seedUsers } from "~/server/seed/users.server";
import { seedGarage } from "~/server/seed/garage.server";
import { createCar } from "~/server/garage-cars.server";
import { createSetupSheet } from "~/server/garage-setups.server";
import type { Role } from "~/lib/access";
import { authCall, CookieJar } from "./auth-support";

export type Who = Role | "outsider";
export const WHO: readonly Who[] = ["owner", "engineer", "analyst", "driver", "outsider"];

async function signIn(email: string, password: string): Promise<CookieJar> {
  const jar = new CookieJar();
  const response = await authCall("/sign-in/email", { json: { email, password }, jar });
  if (response.status !== 200) throw new Error(`sign-in of ${email} failed with ${response.status}: ${await response.text()}`);
  return jar;
}

/** A verified user of another team (with one car and setup of its own). */
async function createOutsider() {
  const run = randomBytes(4).toString("hex");
  const email = `rival.${run}@garage.example`;
  const password = "rival-paddock-77";
  const userId = randomUUID();
  const teamId = randomUUID();
  const now = new Date();
  await db.insert(user).values({ id: userId, email, name: "Rhea Dunmore", emailVerified: true, createdAt: now, updatedAt: now });
  await db.insert(account).values({ id: randomUUID(), accountId: userId, providerId: "credential", userId, password: await hashPassword(password), createdAt: now, updatedAt: now });
  await db.insert(organization).values({ id: teamId, name: "Rival Garage", slug: `rival-${run}`, createdAt: now });
  await db.insert(member).values({ id: randomUUID(), organizationId: teamId, userId, role: "owner", createdAt: now });
  return { email, password, teamId, teamSlug: `rival-${run}`, userId };
}

export const baseSetupValues = {
  frontSpringRateNPerMm: 100,
  rearSpringRateNPerMm: 120,
  frontMotionRatio: 0.9,
  rearMotionRatio: 0.8,
  frontBumpStopKind: "none" as const,
  rearBumpStopKind: "none" as const,
  rearWingAngleDeg: 8,
  changeNote: "Test baseline",
};

export async function garageWorld() {
  const { teamId, userIds } = await seedUsers();
  await seedGarage();
  const [team] = await db.select().from(organization).where(eq(organization.id, teamId));
  const outsider = await createOutsider();
  const jars = {} as Record<Who, CookieJar>;
  for (const demo of DEMO_USERS) jars[demo.role] = await signIn(demo.email, DEMO_PASSWORD);
  jars.outsider = await signIn(outsider.email, outsider.password);
  const carId = await createCar(teamId, userIds.owner, {
    name: `Matrix car ${randomBytes(3).toString("hex")}`,
    category: "Test",
    wheelbaseMm: 2450,
    cogHeightMm: 400,
    steeringRatio: 12,
    fuelDensityKgPerL: 0.745,
    massKg: 620,
    staticFrontWeightPct: 44,
  });
  const { setupId, sheetId } = await createSetupSheet(teamId, userIds.owner, carId, "Matrix setup", baseSetupValues);
  const rivalCarId = await createCar(outsider.teamId, outsider.userId, {
    name: "Rival car",
    wheelbaseMm: 2500,
    cogHeightMm: 420,
    steeringRatio: 13,
    fuelDensityKgPerL: 0.745,
    massKg: 900,
    staticFrontWeightPct: 48,
  });
  const rival = await createSetupSheet(outsider.teamId, outsider.userId, rivalCarId, "Rival setup", baseSetupValues);
  return { team: team!, userIds, jars, carId, setupId, sheetId, outsider, rivalCarId, rivalSetupId: rival.setupId };
}

// The team dashboard's loader (prepared statements in app/server/dashboard.server.ts): its counts and
// recent cars must equal what the Garage's own list and the member table say, and follow an archived car.
import { and, eq, isNull } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { member } from "~/db/schema/auth";
import { cars } from "~/db/schema/garage";
import { db } from "~/server/db.server";
import { listCars } from "~/server/garage-cars.server";
import * as dashboard from "~/routes/teams/dashboard";
import { args, getRequest, outcome } from "./auth-support";
import { garageWorld } from "./garage-support";

type Home = { memberCount: number; carCount: number; recentCars: Array<{ id: string; name: string; setupSheets: number }> };

let w: Awaited<ReturnType<typeof garageWorld>>;
beforeAll(async () => {
  w = await garageWorld();
});

const home = async (who: "owner" | "outsider" = "owner") =>
  outcome(() => dashboard.loader(args(getRequest(`/t/${w.team.slug}`, w.jars[who]), { teamSlug: w.team.slug })));

describe("team dashboard", () => {
  it("counts the team's members and live cars, and lists the newest-changed cars as the Garage does", async () => {
    const body = (await home()).body as Home;
    const members = await db.select({ id: member.id }).from(member).where(eq(member.organizationId, w.team.id));
    const garage = await listCars(w.team.id, { sort: "updated", dir: "desc" });
    expect(body.memberCount).toBe(members.length);
    expect(body.carCount).toBe(garage.length);
    expect(body.carCount).toBeGreaterThanOrEqual(2);
    expect(body.recentCars.map((c) => [c.id, c.setupSheets])).toEqual(garage.slice(0, 5).map((c) => [c.id, c.setupSheets]));
  });

  it("an archived car leaves the count and the list; another team's member gets 404", async () => {
    const before = (await home()).body as Home;
    await db.update(cars).set({ archivedAt: new Date() }).where(eq(cars.id, w.carId));
    try {
      const after = (await home()).body as Home;
      expect(after.carCount).toBe(before.carCount - 1);
      expect(after.recentCars.map((c) => c.id)).not.toContain(w.carId);
      const live = await db.select({ id: cars.id }).from(cars).where(and(eq(cars.teamId, w.team.id), isNull(cars.archivedAt)));
      expect(after.carCount).toBe(live.length);
    } finally {
      await db.update(cars).set({ archivedAt: null }).where(eq(cars.id, w.carId));
    }
    expect((await home("outsider")).status).toBe(404);
  });
});

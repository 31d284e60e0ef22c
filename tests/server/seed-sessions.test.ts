// The demo seed's sessions: eight stints over three days for the demo team's two cars, stored through
// storeSessionOfRecord from logs the demo generator simulates; a wing change between the first two days
// and other weather on the third. Checked against the simulator's own inputs (the truth it was given)
// and ISA/ideal-gas density for the day's weather (ISO 2533:1975; density = p / (R·T), common practice).
import { and, asc, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { organization } from "~/db/schema/auth";
import { setups } from "~/db/schema/garage";
import { analysisSessions, rawUploads, sessionBands, sessionResults } from "~/db/schema/sessions";
import { db } from "~/server/db.server";
import { seedGarage } from "~/server/seed/garage.server";
import { seedSessions } from "~/server/seed/sessions.server";
import { seedUsers } from "~/server/seed/users.server";

let teamId = "";
let addedFirst = 0;
beforeAll(async () => {
  await seedUsers();
  await seedGarage();
  addedFirst = await seedSessions();
  const [team] = await db.select({ id: organization.id }).from(organization).where(eq(organization.slug, "harrowgate"));
  teamId = team.id;
}, 120_000);

const seeded = () =>
  db
    .select({ id: analysisSessions.id, date: analysisSessions.sessionDate, run: analysisSessions.runLabel, carId: analysisSessions.carId, setupVersion: setups.version, status: analysisSessions.status, summary: analysisSessions.summary, airTempC: analysisSessions.airTempC })
    .from(analysisSessions)
    .innerJoin(setups, eq(setups.id, analysisSessions.setupId))
    .where(and(eq(analysisSessions.teamId, teamId), eq(analysisSessions.source, "seed")))
    .orderBy(asc(analysisSessions.sessionDate), asc(analysisSessions.runLabel));

type Summary = { air_density_kg_m3: number; aero: { cla_rear_m2: number | null; cla_front_m2: number | null }; bands: unknown[]; car: { name: string } };

describe("demo sessions", () => {
  it("eight checked sessions over three days for both cars, each with bands, a result and its raw file", async () => {
    const rows = await seeded();
    expect(rows).toHaveLength(8);
    expect(new Set(rows.map((r) => r.date))).toEqual(new Set(["2026-05-16", "2026-05-17", "2026-05-23"]));
    expect(new Set(rows.map((r) => (r.summary as Summary).car.name))).toEqual(new Set(["Marlin SR2", "Vesper GT4-R"]));
    for (const r of rows) {
      expect(r.status).toBe("checked");
      expect((await db.select().from(sessionBands).where(eq(sessionBands.sessionId, r.id))).length).toBe((r.summary as Summary).bands.length);
      expect((await db.select().from(sessionResults).where(eq(sessionResults.sessionId, r.id))).map((x) => x.reason)).toEqual(["seed"]);
      expect((await db.select().from(rawUploads).where(eq(rawUploads.sessionId, r.id))).map((x) => x.status)).toEqual(["attached"]);
    }
  });

  it("the Marlin's rear wing goes from setup v1 to v2 between the two Kestrel Bank days, and its rear ClA rises with it", async () => {
    const marlin = (await seeded()).filter((r) => (r.summary as Summary).car.name === "Marlin SR2" && r.date !== "2026-05-23");
    const day1 = marlin.filter((r) => r.date === "2026-05-16");
    const day2 = marlin.filter((r) => r.date === "2026-05-17");
    expect(day1.map((r) => r.setupVersion)).toEqual([1, 1]);
    expect(day2.map((r) => r.setupVersion)).toEqual([2, 2]);
    // Simulated rear ClA: 0.75 m² on v1, 0.86 m² on v2 (the scenario's inputs); each day's mean is within 10 % of it.
    const rear = (rows: typeof marlin) => rows.reduce((s, r) => s + (r.summary as Summary).aero.cla_rear_m2!, 0) / rows.length;
    expect(Math.abs(rear(day1) - 0.75) / 0.75).toBeLessThan(0.1);
    expect(Math.abs(rear(day2) - 0.86) / 0.86).toBeLessThan(0.1);
    expect(rear(day2)).toBeGreaterThan(rear(day1));
  });

  it("the hill-climb day has other weather, and the density used is the ideal-gas density of that air", async () => {
    const rows = await seeded();
    const hill = rows.filter((r) => r.date === "2026-05-23");
    const kestrel = rows.filter((r) => r.date !== "2026-05-23");
    expect(new Set(hill.map((r) => r.airTempC))).toEqual(new Set([6]));
    expect(new Set(kestrel.map((r) => r.airTempC))).toEqual(new Set([17]));
    // Dry-air estimate p/(R·T) with R = 287.05 J/(kg·K): 96200 / (287.05 × 279.15) ≈ 1.2005 kg/m³ (computed by us);
    // the engine adds 80 % humidity (CIPM-2007), which lowers it slightly.
    const dry = 96_200 / (287.05 * 279.15);
    for (const r of hill) {
      const used = (r.summary as Summary).air_density_kg_m3;
      expect(used).toBeLessThan(dry);
      expect(used).toBeGreaterThan(dry * 0.99);
    }
  });

  it("is idempotent: a second run adds nothing", async () => {
    expect(addedFirst).toBeGreaterThanOrEqual(0);
    expect(await seedSessions()).toBe(0);
    expect(await seeded()).toHaveLength(8);
  });
});

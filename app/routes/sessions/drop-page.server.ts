/**
 * What the Drop a log page's form offers: the team's cars with every setup version, its venues and
 * its members (drivers). Every query is scoped to the team.
 */
import { and, asc, desc, eq } from "drizzle-orm";
import { cars, setupSheets, setups } from "~/db/schema/garage";
import { venues } from "~/db/schema/sessions";
import { db } from "~/server/db.server";
import { listMembers } from "~/server/teams.server";

export interface DropChoices {
  cars: { id: string; name: string; fuelDensityKgPerL: number | null; setups: { id: string; label: string }[] }[];
  venues: { id: string; name: string; altitudeM: number | null }[];
  members: { userId: string; name: string }[];
}

export async function dropChoices(teamId: string): Promise<DropChoices> {
  const [carRows, setupRows, venueRows, members] = await Promise.all([
    db.select({ id: cars.id, name: cars.name, fuelDensityKgPerL: cars.fuelDensityKgPerL }).from(cars).where(eq(cars.teamId, teamId)).orderBy(asc(cars.name), asc(cars.id)),
    db
      .select({ id: setups.id, carId: setups.carId, version: setups.version, sheet: setupSheets.name, updatedAt: setups.updatedAt })
      .from(setups)
      .innerJoin(setupSheets, eq(setupSheets.id, setups.sheetId))
      .where(and(eq(setups.teamId, teamId), eq(setupSheets.teamId, teamId)))
      .orderBy(desc(setups.updatedAt), asc(setupSheets.name), desc(setups.version)),
    db
      .select({ id: venues.id, name: venues.name, altitudeM: venues.altitudeM })
      .from(venues)
      .where(eq(venues.teamId, teamId))
      .orderBy(asc(venues.name)),
    listMembers(teamId),
  ]);
  return {
    cars: carRows.map((c) => ({
      ...c,
      // Most recently changed version first: the one the car most likely ran on.
      setups: setupRows.filter((s) => s.carId === c.id).map((s) => ({ id: s.id, label: `${s.sheet} · v${s.version}` })),
    })),
    venues: venueRows,
    members: members.map((m) => ({ userId: m.userId, name: m.name })),
  };
}

/**
 * What the team dashboard reads on every render, as prepared statements (built once, not per request:
 * Drizzle's query building costs more CPU than the round trip itself; `npm run bench:render`).
 */
import { asc, desc, eq, sql } from "drizzle-orm";
import { member, organization } from "../db/schema/auth";
import { cars } from "../db/schema/garage";
import { db } from "./db.server";
import { liveCarsQuery } from "./garage-cars.server";

function prepareCounts() {
  const teamId = sql.placeholder("teamId");
  return db
    .select({
      members: sql<number>`(select count(*) from ${member} where ${member.organizationId} = ${teamId})`.mapWith(Number),
      cars: sql<number>`(select count(*) from ${cars} where ${cars.teamId} = ${teamId} and ${cars.archivedAt} is null)`.mapWith(Number),
    })
    .from(organization)
    .where(eq(organization.id, teamId))
    .prepare();
}

function prepareRecentCars() {
  return liveCarsQuery(sql.placeholder("teamId")).orderBy(desc(cars.updatedAt), asc(cars.id)).limit(5).prepare();
}

let counts: ReturnType<typeof prepareCounts> | undefined;
let recentCars: ReturnType<typeof prepareRecentCars> | undefined;

/** The team's member count and (live) car count, in one query. */
export async function teamCounts(teamId: string): Promise<{ members: number; cars: number }> {
  const [row] = await (counts ??= prepareCounts()).execute({ teamId });
  return { members: row?.members ?? 0, cars: row?.cars ?? 0 };
}

/** The five most recently changed live cars of the team, with their setup-sheet counts. */
export function recentlyChangedCars(teamId: string) {
  return (recentCars ??= prepareRecentCars()).execute({ teamId });
}

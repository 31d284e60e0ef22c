// One session and membership lookup per request (DEVELOPERS.md, "Teams, roles and permissions"): the
// layout's loader and the page's loader receive the same Request (react-router.config.ts,
// v8_passThroughRequests) and share the answer instead of asking MariaDB again. The count of statements
// comes from MariaDB's own `Questions` status variable (MariaDB Server docs, "Server Status Variables",
// from memory: statements executed by the server, sent by clients).
import { beforeAll, describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import { db } from "~/server/db.server";
import { listTeamsOf, requireMember } from "~/server/permissions.server";
import { getSignedIn } from "~/server/session.server";
import { garageWorld } from "./garage-support";
import { getRequest } from "./auth-support";

type World = Awaited<ReturnType<typeof garageWorld>>;
let world: World;

async function questions(): Promise<number> {
  const [rows] = (await db.execute(sql`SHOW GLOBAL STATUS LIKE 'Questions'`)) as unknown as [Array<{ Value: string }>];
  return Number(rows[0].Value);
}

beforeAll(async () => {
  world = await garageWorld();
});

describe("per-request lookups", () => {
  it("asks for the session once however many loaders of the request ask", async () => {
    const request = getRequest(`/t/${world.team.slug}/garage`, world.jars.engineer);
    const first = getSignedIn(request);
    expect(getSignedIn(request)).toBe(first);
    expect((await first)?.user.email).toBeTruthy();
    // A new request is a new lookup (a sign-out in between must be seen).
    expect(getSignedIn(getRequest(`/t/${world.team.slug}/garage`, world.jars.engineer))).not.toBe(first);
  });

  it("sends no statement to MariaDB for a second requireMember on the same request", async () => {
    const request = getRequest(`/t/${world.team.slug}/garage`, world.jars.analyst);
    const before = await questions();
    const first = await requireMember(request, world.team.slug, { car: ["read"] });
    const afterFirst = await questions();
    const second = await requireMember(request, world.team.slug, { car: ["read"] });
    const afterSecond = await questions();
    expect(second).toEqual(first);
    // The first call looks up the session, its user and the membership (plus our own SHOW STATUS).
    expect(afterFirst - before).toBeGreaterThan(1);
    // The second call: only our own SHOW STATUS statement.
    expect(afterSecond - afterFirst).toBe(1);
  });

  it("gives the layout its team list from the lookup requireMember made", async () => {
    const request = getRequest(`/t/${world.team.slug}/garage`, world.jars.owner);
    const ctx = await requireMember(request, world.team.slug);
    const before = await questions();
    const teams = await listTeamsOf(ctx.user.id, request);
    expect(await questions()).toBe(before + 1);
    expect(teams.map((t) => t.slug)).toContain(world.team.slug);
    // Without the request it asks MariaDB itself, and agrees.
    expect(await listTeamsOf(ctx.user.id)).toEqual(teams);
  });

  it("still answers each permission separately on a shared lookup", async () => {
    const request = getRequest(`/t/${world.team.slug}/garage`, world.jars.analyst);
    await requireMember(request, world.team.slug, { car: ["read"] });
    const refused = await requireMember(request, world.team.slug, { car: ["create"] }).then(
      () => null,
      (thrown: unknown) => thrown,
    );
    expect(refused).not.toBeNull();
  });
});

// The owner's audit page (issue 12 item 2): who did what and when, for the owner only, newest first, paged.
import { beforeAll, describe, expect, it } from "vitest";
import * as auditPage from "~/routes/audit/audit";
import * as settings from "~/routes/teams/settings";
import { listMembers } from "~/server/teams.server";
import { args, formRequest, getRequest, outcome } from "./auth-support";
import { garageWorld, WHO } from "./garage-support";

type World = Awaited<ReturnType<typeof garageWorld>>;
let w: World;
beforeAll(async () => {
  w = await garageWorld();
});

const load = (who: (typeof WHO)[number], query = "") =>
  outcome(() => auditPage.loader(args(getRequest(`/t/${w.team.slug}/audit${query}`, w.jars[who]), { teamSlug: w.team.slug })));

describe("audit page", () => {
  it.each([["engineer", 403], ["analyst", 403], ["driver", 403], ["outsider", 404]] as const)("%s gets %i", async (who, status) => {
    expect((await load(who)).status).toBe(status);
  });

  it("a role change shows up for the owner with who, what and the new role", async () => {
    const analyst = (await listMembers(w.team.id)).find((m) => m.role === "analyst")!;
    const path = `/t/${w.team.slug}/settings`;
    for (const role of ["engineer", "analyst"]) {
      const changed = await outcome(() => settings.action(args(formRequest(path, { intent: "change-role", memberId: analyst.memberId, role }, w.jars.owner), { teamSlug: w.team.slug })));
      expect(changed.status).toBe(200);
    }
    const page = await load("owner", "?action=member_role_changed");
    expect(page.status).toBe(200);
    const entries = (page.body as { entries: Array<{ words: string; detail: { role: string }; actor: { name: string } | null }> }).entries;
    expect(entries.slice(0, 2).map((e) => [e.words, e.detail.role])).toEqual([["changed a member's role", "analyst"], ["changed a member's role", "engineer"]]);
    expect(entries[0].actor?.name).toBeTruthy();
    console.log("tried: two role changes, then the audit page as each role; held: owner sees both newest first, others refused");
  });

  it("pages with a stable cursor and ignores a malformed one", async () => {
    const first = await load("owner");
    expect(first.status).toBe(200);
    const odd = await load("owner", "?before=1%27%20or%201%3D1--");
    expect(odd.status).toBe(200);
    expect((odd.body as { entries: unknown[] }).entries).toEqual((first.body as { entries: unknown[] }).entries);
  });
});

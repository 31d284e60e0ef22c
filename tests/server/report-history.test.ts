// The Balance report's processing history and re-analysis state: every stored result newest first (with
// whether the server's re-check differed), the job still waiting, and the re-check's diff read as lines.
// The diff shape is the one app/lib/sessions/summary-diff.ts writes (its own tests hold its rules).
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import * as page from "~/routes/sessions/session";
import * as reanalyse from "~/routes/api/session-reanalyse";
import { db } from "~/server/db.server";
import { sessionResults } from "~/db/schema/sessions";
import { diffLines } from "~/components/report/details";
import { args, formRequest, getRequest, outcome } from "./auth-support";
import { garageWorld } from "./garage-support";
import { storeDemoSession } from "./report-support";

let w: Awaited<ReturnType<typeof garageWorld>>;
let id: string;
beforeAll(async () => {
  w = await garageWorld();
  id = (await storeDemoSession("marlin-comma", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "History" })).id;
});

type Body = { history: { results: { reason: string; origin: string; differs: boolean; setupVersion: number | null; by: string | null }[]; openJob: { status: string; reason: string } | null } };
const report = async (who: keyof typeof w.jars = "engineer") =>
  (await outcome(() => page.loader(args(getRequest(`/t/${w.team.slug}/sessions/${id}`, w.jars[who]), { teamSlug: w.team.slug, sessionId: id })))).body as Body;

describe("processing history on the Balance report", () => {
  it("lists stored results newest first and says whether the server's re-check differed", async () => {
    const t0 = Date.now() - 60_000;
    await db.insert(sessionResults).values([
      { id: randomUUID(), sessionId: id, teamId: w.team.id, origin: "browser", reason: "upload", engineVersion: "summary-v2", setupId: w.setupId, createdAt: new Date(t0) },
      {
        id: randomUUID(), sessionId: id, teamId: w.team.id, origin: "server", reason: "recheck", engineVersion: "summary-v2", setupId: w.setupId,
        diff: { differences: [{ path: "aero.cla_total_m2", browser: 1.2101, server: 1.2205 }], compared: 40, truncated: false }, createdAt: new Date(t0 + 1000),
      },
    ]);
    const { history } = await report();
    expect(history.results.map((r) => [r.origin, r.reason, r.differs, r.setupVersion])).toEqual([
      ["server", "recheck", true, 1],
      ["browser", "upload", false, 1],
    ]);
    expect(history.openJob).toBeNull();
  });

  it("a re-analysis asked for by an engineer shows as queued on the report; an analyst may not ask (403)", async () => {
    const post = (who: keyof typeof w.jars) =>
      outcome(() => reanalyse.action(args(formRequest(`/api/t/${w.team.slug}/sessions/${id}/reanalyse`, { setupId: "" }, w.jars[who]), { teamSlug: w.team.slug, sessionId: id })));
    expect((await post("analyst")).status).toBe(403);
    const asked = await post("engineer");
    expect(asked.status).toBe(202);
    const { history } = await report("analyst");
    expect(history.openJob).toMatchObject({ status: "queued", reason: "reanalysis" });
  });

  it("the re-check's diff reads as one line per figure, browser → server", () => {
    expect(diffLines({ differences: [{ path: "aero.cla_total_m2", browser: 1.2101, server: 1.2205 }], compared: 40, truncated: false })).toEqual([
      "aero.cla_total_m2: browser 1.2101 → server 1.2205",
    ]);
    expect(diffLines({ differences: [], compared: 40, truncated: false })).toEqual([]);
    expect(diffLines(null)).toEqual([]);
  });
});

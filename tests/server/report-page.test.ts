// The Balance report's loader: figures straight from the summary of record of a demo log, the
// verdict from the sentence rules, team scoping (another team's id is 404, DEVELOPERS.md) and
// role rules (drivers reach sessions only through a Brief link: app/lib/access.ts).
import { beforeAll, describe, expect, it } from "vitest";
import * as page from "~/routes/sessions/session";
import { verdictSentence } from "~/lib/report/verdict";
import { args, getRequest, outcome } from "./auth-support";
import { garageWorld } from "./garage-support";
import { storeDemoSession } from "./report-support";

let w: Awaited<ReturnType<typeof garageWorld>>;
let sessionId: string;
let rivalSessionId: string;
beforeAll(async () => {
  w = await garageWorld();
  sessionId = (await storeDemoSession("marlin-comma", { teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "Kestrel Bank FP1" })).id;
  rivalSessionId = (await storeDemoSession("marlin-splitter", { teamId: w.outsider.teamId, carId: w.rivalCarId, setupId: w.rivalSetupId, name: "Rival run" })).id;
});

const load = (slug: string, id: string, who: keyof typeof w.jars) =>
  outcome(() => page.loader(args(getRequest(`/t/${slug}/sessions/${id}`, w.jars[who]), { teamSlug: slug, sessionId: id })));

describe("Balance report loader", () => {
  it("gives the summary of record, its verdict and the session's car and setup", async () => {
    const out = await load(w.team.slug, sessionId, "analyst");
    expect(out.status).toBe(200);
    const body = out.body as Awaited<ReturnType<typeof page.loader>>;
    expect(body.head.name).toBe("Kestrel Bank FP1");
    expect(body.head.car.id).toBe(w.carId);
    expect(body.head.setup.version).toBe(1);
    expect(body.summary!.aero.cla_total_m2).toBeGreaterThan(1);
    expect(body.summary!.traces).toBeUndefined();
    expect(body.verdict).toBe(verdictSentence(body.summary!));
  });
  it("answers 404 for another team's session and for an unknown id, and 403 for a driver", async () => {
    expect((await load(w.team.slug, rivalSessionId, "owner")).status).toBe(404);
    expect((await load(w.team.slug, "no-such-session", "owner")).status).toBe(404);
    expect((await load(w.team.slug, sessionId, "outsider")).status).toBe(404);
    expect((await load(w.team.slug, sessionId, "driver")).status).toBe(403);
  });
});

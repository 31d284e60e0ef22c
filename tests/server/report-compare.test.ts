// Compare on two demo stints with a known difference: the low-splitter Marlin log was simulated with
// more front downforce than the baseline log (sample-data/logs/*.truth.json, the simulator's own
// truth). The engine's per-band balance changes must be clear, forward, and agree with the truth's
// change; the setup fields that differ between the two setup versions are listed beside them.
import { readFileSync } from "node:fs";
import { beforeAll, describe, expect, it } from "vitest";
import * as compareRoute from "~/routes/api/compare";
import { createApiToken } from "~/server/api-tokens.server";
import { appUrl, args } from "./auth-support";
import { garageWorld } from "./garage-support";
import { demoMarlin, storeDemoSession } from "./report-support";

const truth = (name: string) => JSON.parse(readFileSync(`sample-data/logs/${name}.truth.json`, "utf8"));

let w: Awaited<ReturnType<typeof garageWorld>>;
let baseId: string;
let splitterId: string;
let rivalId: string;
let token: string;
beforeAll(async () => {
  w = await garageWorld();
  const m = await demoMarlin();
  baseId = (await storeDemoSession("marlin-comma", { teamId: m.team.id, carId: m.car.id, setupId: m.setupIds[0], name: "Baseline", sessionDate: "2026-05-16" })).id;
  splitterId = (await storeDemoSession("marlin-splitter", { teamId: m.team.id, carId: m.car.id, setupId: m.setupIds[1], name: "Low splitter", sessionDate: "2026-06-02" })).id;
  rivalId = (await storeDemoSession("marlin-comma", { teamId: w.outsider.teamId, carId: w.rivalCarId, setupId: w.rivalSetupId })).id;
  const made = await createApiToken(w.userIds.analyst, w.team.slug, "compare tests");
  if (!made.ok) throw new Error(made.message);
  token = made.token;
});

async function get(query: string) {
  try {
    return await compareRoute.loader(args(new Request(`${appUrl}/api/compare?${query}`, { headers: { authorization: `Bearer ${token}` } })));
  } catch (thrown) {
    if (thrown instanceof Response) return thrown;
    throw thrown;
  }
}

describe("GET /api/compare", () => {
  it("finds the splitter's forward balance shift in the bands where the truth has it, with the setup changes beside it", async () => {
    const res = await get(`ids=${baseId},${splitterId}`);
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.baseline).toBe(baseId);
    expect(body.sessions.map((s: { id: string }) => s.id)).toEqual([baseId, splitterId]);
    const [diff] = body.differences;
    expect(diff).toMatchObject({ id: splitterId, against: baseId });
    const tA = truth("marlin-kestrel-comma");
    const tB = truth("marlin-kestrel-splitter");
    let checked = 0;
    for (const band of diff.comparison.bands) {
      const bal = band.balance_front_pct;
      if (bal.change === null || bal.ci95 === null) continue;
      const a = tA.bands.find((b: { min_kmh: number }) => b.min_kmh === band.min_kmh);
      const b = tB.bands.find((x: { min_kmh: number }) => x.min_kmh === band.min_kmh);
      const truthChange = b.balance_front_pct - a.balance_front_pct;
      // The truth's change lies within the engine's interval, widened by 1 point for the model
      // bias the two stints do not share (the splitter moves the front ride height; our allowance).
      expect(truthChange, `band ${band.min_kmh}`).toBeGreaterThan(bal.ci95[0] - 1);
      expect(truthChange, `band ${band.min_kmh}`).toBeLessThan(bal.ci95[1] + 1);
      if (truthChange > 2) {
        expect(bal.clear).toBe(true);
        expect(bal.change).toBeGreaterThan(0);
      }
      checked++;
    }
    expect(checked).toBeGreaterThanOrEqual(3);
    // Setup versions 1 and 2 of the demo sheet differ in the rear wing (app/server/seed/garage.server.ts).
    expect(diff.setup_changes.map((r: { field: string }) => r.field)).toContain("rearWingAngleDeg");
    expect(diff.sentences.some((s: string) => /Rear wing angle [\d.]+ → [\d.]+ deg → balance \+\d+\.\d points.* at \d+–\d+ km\/h \(clear\)$/.test(s))).toBe(true);
    expect(body.sessions[0].bands[0]).toHaveProperty("aero_load_front_n_std_air");
  });
  it("refuses fewer than two ids (400), and another team's id (404), without naming more than the missing id", async () => {
    expect((await get(`ids=${baseId}`)).status).toBe(400);
    const foreign = await get(`ids=${baseId},${rivalId}`);
    expect(foreign.status).toBe(404);
    expect((await foreign.json()).error).toContain(rivalId);
  });
});

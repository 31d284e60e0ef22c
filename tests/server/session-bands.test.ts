// The sessions schema fits the engine's summary: a CLI-shaped summary of a demo log is stored as a
// session with one session_bands row per speed band, and reads back with the same figures.
import { randomUUID } from "node:crypto";
import { createReadStream, readFileSync } from "node:fs";
import { asc, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { analyseLog } from "~/engine/analyse";
import { analysisSessions, sessionBands } from "~/db/schema/sessions";
import { bandRowsOf } from "~/lib/sessions/band-rows";
import { db } from "~/server/db.server";
import { garageWorld } from "./garage-support";

let w: Awaited<ReturnType<typeof garageWorld>>;
beforeAll(async () => {
  w = await garageWorld();
});

describe("session_bands rows from a summary", () => {
  it("stores every band with its intervals and reads them back unchanged; deleting the session removes them", async () => {
    const log = "sample-data/logs/marlin-kestrel-comma";
    const car = JSON.parse(readFileSync("sample-data/cars/marlin-sr2.json", "utf8"));
    const summary = await analyseLog(createReadStream(`${log}.csv`), car, JSON.parse(readFileSync(`${log}.map.json`, "utf8")));
    const sessionId = randomUUID();
    await db.insert(analysisSessions).values({ id: sessionId, teamId: w.team.id, carId: w.carId, setupId: w.setupId, name: "Race 1", summaryVersion: summary.summary_version, summary });
    await db.insert(sessionBands).values(bandRowsOf(sessionId, summary));
    const rows = await db.select().from(sessionBands).where(eq(sessionBands.sessionId, sessionId)).orderBy(asc(sessionBands.minKmh));
    expect(rows).toHaveLength(summary.bands.length);
    rows.forEach((row, i) => {
      const b = summary.bands[i];
      expect([row.minKmh, row.maxKmh, row.samples, row.aeroSamples]).toEqual([b.min_kmh, b.max_kmh, b.samples, b.aero_samples]);
      expect(row.balanceFrontPct).toBe(b.balance_front_pct);
      expect(row.balanceFrontCi95LoPct === null ? null : [row.balanceFrontCi95LoPct, row.balanceFrontCi95HiPct]).toEqual(b.balance_front_ci95_pct);
      expect(row.understeerGradientDegPerG).toBe(b.understeer_gradient_deg_per_g);
      expect(row.understeerCi95LoDegPerG === null ? null : [row.understeerCi95LoDegPerG, row.understeerCi95HiDegPerG]).toEqual(b.understeer_ci95_deg_per_g);
    });
    // At least one band carries both intervals (the demo stint has enough fast running and corners).
    expect(rows.some((r) => r.balanceFrontCi95LoPct !== null && r.understeerCi95LoDegPerG !== null)).toBe(true);
    await db.delete(analysisSessions).where(eq(analysisSessions.id, sessionId));
    expect(await db.select().from(sessionBands).where(eq(sessionBands.sessionId, sessionId))).toEqual([]);
  });
});

// Sessions for the report, Compare and data API tests: the engine's real output on the committed
// demo logs (never hand-typed summaries), stored the way a session of record is stored (summary
// without traces, traces apart, one session_bands row per band).
import { randomUUID } from "node:crypto";
import { createReadStream, readFileSync } from "node:fs";
import { analyseLog } from "~/engine/analyse";
import type { SessionSummary } from "~/engine/summary-types";
import { analysisSessions, sessionBands, type SessionStatus } from "~/db/schema/sessions";
import { bandRowsOf } from "~/lib/sessions/band-rows";
import { db } from "~/server/db.server";

export const DEMO_LOGS = {
  "marlin-comma": { log: "sample-data/logs/marlin-kestrel-comma", car: "sample-data/cars/marlin-sr2.json" },
  "marlin-splitter": { log: "sample-data/logs/marlin-kestrel-splitter", car: "sample-data/cars/marlin-sr2.json" },
  "marlin-semicolon": { log: "sample-data/logs/marlin-kestrel-semicolon", car: "sample-data/cars/marlin-sr2-no-static.json" },
  "vesper-tab": { log: "sample-data/logs/vesper-kestrel-tab", car: "sample-data/cars/vesper-gt4r.json" },
} as const;
export type DemoLog = keyof typeof DEMO_LOGS;

const cache = new Map<DemoLog, Promise<SessionSummary>>();

/** The engine's summary of a demo log (with traces), analysed once per test file. */
export function demoSummary(name: DemoLog): Promise<SessionSummary> {
  let hit = cache.get(name);
  if (!hit) {
    const { log, car } = DEMO_LOGS[name];
    hit = analyseLog(createReadStream(`${log}.csv`), JSON.parse(readFileSync(car, "utf8")), JSON.parse(readFileSync(`${log}.map.json`, "utf8")));
    cache.set(name, hit);
  }
  return hit;
}

export interface StoreOptions {
  teamId: string;
  carId: string;
  setupId: string;
  name?: string;
  status?: SessionStatus;
  sessionDate?: string;
  runLabel?: string;
  driverName?: string;
  venueId?: string | null;
}

/** Stores a demo log's analysis as a session of record; returns its id and summary. */
export async function storeDemoSession(name: DemoLog, o: StoreOptions) {
  const full = await demoSummary(name);
  const { traces, ...summary } = full;
  const id = randomUUID();
  await db.insert(analysisSessions).values({
    id,
    teamId: o.teamId,
    carId: o.carId,
    setupId: o.setupId,
    name: o.name ?? `Demo ${name}`,
    status: o.status ?? "checked",
    summaryVersion: full.summary_version,
    summary,
    traces,
    sessionDate: o.sessionDate ?? "2026-05-16",
    runLabel: o.runLabel ?? "Run 1",
    driverName: o.driverName ?? "Ada Quill",
    venueId: o.venueId ?? null,
    source: "seed",
    rawFileName: `${DEMO_LOGS[name].log.split("/").pop()}.csv`,
    rawSha256: randomUUID().replaceAll("-", "").padEnd(64, "0"),
    engineVersion: "test",
    checkedAt: new Date(),
  });
  await db.insert(sessionBands).values(bandRowsOf(id, full));
  return { id, summary: full };
}

/** The demo team's Marlin SR2 and its setup versions (oldest first), after seedUsers() and seedGarage(). */
export async function demoMarlin() {
  const { and, asc, eq } = await import("drizzle-orm");
  const { cars, setups } = await import("~/db/schema/garage");
  const { organization } = await import("~/db/schema/auth");
  const [team] = await db.select().from(organization).where(eq(organization.slug, "harrowgate"));
  const [car] = await db.select().from(cars).where(and(eq(cars.teamId, team.id), eq(cars.name, "Marlin SR2")));
  const versions = await db.select({ id: setups.id, version: setups.version }).from(setups).where(eq(setups.carId, car.id)).orderBy(asc(setups.version));
  return { team, car, setupIds: versions.map((v) => v.id) };
}

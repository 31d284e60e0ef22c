// Re-analysis after a setup-version correction: POST /api/t/:teamSlug/sessions/:sessionId/reanalyse
// names the corrected version at once, and the job (run here by the worker's loop in this process)
// re-reads the stored file with it; the history keeps every result. The new summary carries the
// corrected car data (the spring rate of the new version), as the engine's car file says.
import { createReadStream, readFileSync } from "node:fs";
import { and, asc, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { auditLog } from "~/db/schema/audit";
import { jobs } from "~/db/schema/jobs";
import { analysisSessions, sessionResults } from "~/db/schema/sessions";
import { analyseLog } from "~/engine/analyse";
import { db } from "~/server/db.server";
import { createSetupSheet, getSetup, setupValuesOf } from "~/server/garage-setups.server";
import { startJobLoop } from "~/server/ingest/job-loop.server";
import * as route from "~/routes/api/session-reanalyse";
import { createApiToken } from "~/server/api-tokens.server";
import * as apiSessions from "~/routes/api/sessions";
import { appUrl, args, outcome } from "./auth-support";
import { ingestWorld, LOGS, mapOf } from "./ingest-support";

let w: Awaited<ReturnType<typeof ingestWorld>>;
let sessionId = "";
beforeAll(async () => {
  w = await ingestWorld("reanalyse");
  const made = await createApiToken(w.userId, w.slug, "t");
  if (!made.ok) throw new Error("token");
  const form = new FormData();
  form.set("meta", JSON.stringify({ car: w.cars["marlin-sr2"].carId, map: mapOf("marlin-kestrel-comma"), date: "2026-05-16" }));
  form.set("file", new File([new Uint8Array(readFileSync(`${LOGS}/marlin-kestrel-comma.csv`))], "stint.csv"));
  const res = await outcome(() => apiSessions.action(args(new Request(`${appUrl}/api/sessions`, { method: "POST", headers: { authorization: `Bearer ${made.token}` }, body: form }))));
  sessionId = (res.body as { id: string }).id;
});

const post = (body: unknown, slug = w.slug, id = sessionId, jar = w.jar) =>
  outcome(() =>
    route.action(args(new Request(`${appUrl}/api/t/${slug}/sessions/${id}/reanalyse`, { method: "POST", headers: { origin: appUrl, "content-type": "application/json", cookie: jar.header() }, body: JSON.stringify(body) }), { teamSlug: slug, sessionId: id })),
  );

async function runQueue(teamJobs: () => Promise<Array<{ status: string }>>) {
  const loop = startJobLoop({ label: "test", pollMs: 50, log: () => undefined, analyseFile: (path, car, map, options) => analyseLog(createReadStream(path), car, map, options) });
  try {
    for (let i = 0; i < 400; i++) {
      const rows = await teamJobs();
      if (rows.length && rows.every((r) => r.status === "done" || r.status === "failed")) return rows;
      await new Promise((r) => setTimeout(r, 50));
    }
    throw new Error("jobs did not finish");
  } finally {
    await loop.stop(5000);
  }
}

describe("re-analysis after a setup correction", () => {
  it("names the corrected version, re-reads the file with it and keeps the history", async () => {
    const teamJobs = () => db.select().from(jobs).where(eq(jobs.sessionId, sessionId));
    await runQueue(teamJobs); // the upload's own re-check first
    const { carId, setupId } = w.cars["marlin-sr2"];
    const base = await getSetup(w.teamId, carId, setupId);
    const corrected = await createSetupSheet(w.teamId, w.userId, carId, "Corrected springs", { ...setupValuesOf(base), rearSpringRateNPerMm: 150, changeNote: "Rear spring was 150, not 120" });

    const res = await post({ setupId: corrected.setupId });
    expect(res.status).toBe(202);
    expect((await db.select().from(analysisSessions).where(eq(analysisSessions.id, sessionId)))[0].setupId).toBe(corrected.setupId);
    await runQueue(teamJobs);

    const [session] = await db.select().from(analysisSessions).where(eq(analysisSessions.id, sessionId));
    expect(session.status).toBe("checked");
    expect((session.summary as { car: { rear: { spring_rate_n_per_mm: number } } }).car.rear.spring_rate_n_per_mm).toBe(150);
    const history = await db.select().from(sessionResults).where(eq(sessionResults.sessionId, sessionId)).orderBy(asc(sessionResults.createdAt));
    expect(history.map((h) => [h.origin, h.reason])).toEqual([["server", "api"], ["server", "recheck"], ["server", "reanalysis"]]);
    expect(history[2].setupId).toBe(corrected.setupId);
    const actions = (await db.select().from(auditLog).where(and(eq(auditLog.teamId, w.teamId), eq(auditLog.subjectId, sessionId)))).map((a) => a.action).sort();
    expect(actions).toEqual(["session_reanalysed", "session_reanalysis_requested", "session_uploaded"]);
  });

  it("refuses another car's setup version (422), another team's session (404) and a member of another team (404)", async () => {
    expect((await post({ setupId: w.cars["vesper-gt4r"].setupId })).status).toBe(422);
    const other = await ingestWorld("reanalyse-other");
    expect((await post({}, other.slug, sessionId, other.jar)).status).toBe(404);
    expect((await post({}, w.slug, sessionId, other.jar)).status).toBe(404);
  });
});

describe("a re-check given up", () => {
  it("flags the session with the reason instead of leaving it read", async () => {
    const { claimJob, enqueueJob, failJob } = await import("~/server/jobs.server");
    await db.update(analysisSessions).set({ status: "read" }).where(eq(analysisSessions.id, sessionId));
    const id = await enqueueJob(db, { kind: "session_check", teamId: w.teamId, sessionId, maxAttempts: 1 });
    const job = await claimJob("w-fail", { teamId: w.teamId });
    expect(job?.id).toBe(id);
    await failJob(id, "w-fail", "the stored file is missing");
    const [session] = await db.select().from(analysisSessions).where(eq(analysisSessions.id, sessionId));
    expect([session.status, session.statusDetail]).toEqual(["flagged", "The server could not re-check the stored file: the stored file is missing"]);
  });
});

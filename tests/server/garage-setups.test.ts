// Setup versions against the real MariaDB: a version a session uses is never changed in place.
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import { auditLog } from "~/db/schema/audit";
import { db } from "~/server/db.server";
import { setups } from "~/db/schema/garage";
import { analysisSessions } from "~/db/schema/sessions";
import * as editRoute from "~/routes/garage/setup-edit";
import * as diffRoute from "~/routes/garage/setup-diff";
import { createSetupSheet, getSetup, setupHistory } from "~/server/garage-setups.server";
import { args, formRequest, getRequest, outcome } from "./auth-support";
import { baseSetupValues, garageWorld } from "./garage-support";

type World = Awaited<ReturnType<typeof garageWorld>>;
let world: World;

beforeAll(async () => {
  world = await garageWorld();
});

const form = (over: Record<string, string> = {}) => ({
  units: "metric",
  name: "Immutability check",
  frontSpringRateNPerMm: "100",
  rearSpringRateNPerMm: "120",
  frontMotionRatio: "0.9",
  rearMotionRatio: "0.8",
  frontBumpStopKind: "none",
  rearBumpStopKind: "none",
  rearWingAngleDeg: "8",
  ...over,
});

async function freshSetup() {
  return createSetupSheet(world.team.id, world.userIds.owner, world.carId, "Immutability check", baseSetupValues);
}

function edit(setupId: string, fields: Record<string, string>) {
  const path = `/t/${world.team.slug}/garage/${world.carId}/setups/${setupId}/edit`;
  return outcome(() => editRoute.action(args(formRequest(path, fields, world.jars.engineer), { teamSlug: world.team.slug, carId: world.carId, setupId })));
}

describe("setup versions", () => {
  it("every save writes the next version and leaves the one edited exactly as it was (issue 12 item 4)", async () => {
    const { setupId, sheetId } = await freshSetup();
    const [before] = await db.select().from(setups).where(eq(setups.id, setupId));
    const saved = await edit(setupId, form({ rearWingAngleDeg: "10", changeNote: "Two more degrees" }));
    // RFC 9110 §15.4.3: 302 Found to the saved version's page.
    expect(saved.status).toBe(302);
    const newId = new URL(saved.location!, "http://x").pathname.split("/").at(-1)!;
    expect(newId).not.toBe(setupId);
    const [after] = await db.select().from(setups).where(eq(setups.id, setupId));
    expect(after).toEqual(before);
    const next = await getSetup(world.team.id, world.carId, newId);
    expect(next.version).toBe(2);
    expect(next.rearWingAngleDeg).toBe(10);
    expect(next.changeNote).toBe("Two more degrees");
    // A third save without a note does not inherit the second one's note.
    const third = await edit(newId, form({ rearWingAngleDeg: "11" }));
    const thirdId = new URL(third.location!, "http://x").pathname.split("/").at(-1)!;
    const v3 = await getSetup(world.team.id, world.carId, thirdId);
    expect(v3.version).toBe(3);
    expect(v3.changeNote).toBeNull();
    const history = await setupHistory(world.team.id, sheetId);
    expect(history.map((h) => h.version)).toEqual([3, 2, 1]);
    expect(history.map((h) => h.changeNote)).toEqual([null, "Two more degrees", before.changeNote]);
    const events = await db.select().from(auditLog).where(and(eq(auditLog.teamId, world.team.id), eq(auditLog.subjectId, thirdId)));
    expect(events.map((e) => [e.action, e.actorUserId, e.detail?.version])).toEqual([["setup_version_created", world.userIds.engineer, 3]]);
    console.log("tried: three saves of one setup; held: v1 and v2 unchanged, v3 without v2's note, one audit event per version");
  });

  it("a save that changes nothing writes no version", async () => {
    const { setupId, sheetId } = await freshSetup();
    const current = await getSetup(world.team.id, world.carId, setupId);
    const same = await edit(setupId, form({ rearWingAngleDeg: String(current.rearWingAngleDeg ?? "") }));
    expect(same.status).toBe(302);
    expect(same.location).toBe(`/t/${world.team.slug}/garage/${world.carId}/setups/${setupId}?saved=unchanged`);
    expect((await setupHistory(world.team.id, sheetId)).length).toBe(1);
  });

  it("once a session uses a version, an edit writes version 2 and leaves version 1 exactly as it was", async () => {
    const { setupId, sheetId } = await freshSetup();
    const [before] = await db.select().from(setups).where(eq(setups.id, setupId));
    await db.insert(analysisSessions).values({
      id: randomUUID(),
      teamId: world.team.id,
      carId: world.carId,
      setupId,
      name: "Kestrel Bank Raceway, stint 1",
      status: "checked",
      createdBy: world.userIds.engineer,
    });
    const saved = await edit(setupId, form({ rearWingAngleDeg: "12", rearSpringRateNPerMm: "135", changeNote: "More wing" }));
    expect(saved.status).toBe(302);
    const newId = new URL(saved.location!, "http://x").pathname.split("/").at(-1)!;
    expect(newId).not.toBe(setupId);

    const [after] = await db.select().from(setups).where(eq(setups.id, setupId));
    expect(after).toEqual(before);
    const next = await getSetup(world.team.id, world.carId, newId);
    expect(next.version).toBe(2);
    expect(next.sheetId).toBe(sheetId);
    expect(next.rearWingAngleDeg).toBe(12);
    expect(next.rearSpringRateNPerMm).toBe(135);

    const history = await setupHistory(world.team.id, sheetId);
    expect(history.map((h) => h.version)).toEqual([2, 1]);
    expect(history[0].change).toContain("Rear spring rate 120.0 → 135.0 N/mm");
    expect(history[1].sessions).toBe(1);
  });

  it("the diff lists each changed field with old, new and unit (imperial: 1 N/mm = 5.710147 lbf/in, NIST SP 811)", async () => {
    const { setupId } = await freshSetup();
    const saved = await edit(setupId, form({ rearSpringRateNPerMm: "140", intent: "new-version" }));
    const newId = new URL(saved.location!, "http://x").pathname.split("/").at(-1)!;
    const path = `/t/${world.team.slug}/garage/${world.carId}/setups/${newId}/diff?against=${setupId}&units=imperial`;
    const diff = await outcome(() => diffRoute.loader(args(getRequest(path, world.jars.analyst), { teamSlug: world.team.slug, carId: world.carId, setupId: newId })));
    expect(diff.status).toBe(200);
    const rows = (diff.body as { rows: Array<{ field: string; before: string; after: string; unit: string }> }).rows;
    // 120 N/mm ÷ 0.17512683524648 = 685.2 lbf/in; 140 N/mm → 799.4 lbf/in
    expect(rows).toEqual([{ field: "rearSpringRateNPerMm", label: "Rear spring rate", before: "685.2", after: "799.4", unit: "lbf/in" }]);
  });

  it("a refused edit stores nothing (motion ratio 7)", async () => {
    const { setupId } = await freshSetup();
    const [before] = await db.select().from(setups).where(eq(setups.id, setupId));
    const refused = await edit(setupId, form({ frontMotionRatio: "7" }));
    // RFC 9110 §15.5.1: 400 Bad Request for input the server will not process.
    expect(refused.status).toBe(400);
    expect((refused.body as { errors: Record<string, string> }).errors.frontMotionRatio).toMatch(/typing error/);
    const [after] = await db.select().from(setups).where(eq(setups.id, setupId));
    expect(after).toEqual(before);
  });

  it("re-saving in imperial without changes keeps the stored SI values exactly", async () => {
    const { setupId } = await freshSetup();
    // The form shows 100 N/mm as 571.015 lbf/in (6 significant digits): 100 / 0.17512683524648 = 571.0147
    const saved = await edit(setupId, form({ units: "imperial", frontSpringRateNPerMm: "571.015", rearSpringRateNPerMm: "685.218", rearWingAngleDeg: "8" }));
    expect(saved.status).toBe(302);
    const [row] = await db.select().from(setups).where(eq(setups.id, setupId));
    expect(row.frontSpringRateNPerMm).toBe(100);
    expect(row.rearSpringRateNPerMm).toBe(120);
  });
});

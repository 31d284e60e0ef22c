// CAR.json through the web app: import → export equals the file, the demo cars export as the demo
// generator's car files, and the exported file runs through the CLI (`npm run analyse`).
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { and, count, eq, isNull } from "drizzle-orm";
import { db } from "~/server/db.server";
import { cars, setups } from "~/db/schema/garage";
import * as apiExport from "~/routes/api/cars-export";
import * as apiImport from "~/routes/api/cars-import";
import { seedGarage } from "~/server/seed/garage.server";
import { appUrl, args, getRequest, outcome } from "./auth-support";
import { garageWorld } from "./garage-support";

type World = Awaited<ReturnType<typeof garageWorld>>;
let w: World;
beforeAll(async () => {
  w = await garageWorld();
});

async function importFile(text: string) {
  // Imported into the rival team (its owner signed in), so the demo team's cars stay the seeded ones.
  const request = new Request(`${appUrl}/api/t/${w.outsider.teamSlug}/cars/import?setup=Round%20trip`, {
    method: "POST",
    headers: { origin: appUrl, cookie: w.jars.outsider.header(), "content-type": "application/json" },
    body: text,
  });
  return outcome(() => apiImport.action(args(request, { teamSlug: w.outsider.teamSlug })));
}

async function exportText(carId: string, setupId: string, rival = false): Promise<{ status: number; text: string; disposition: string | null }> {
  const teamSlug = rival ? w.outsider.teamSlug : w.team.slug;
  const path = `/api/t/${teamSlug}/cars/${carId}/setups/${setupId}/car.json`;
  const jar = rival ? w.jars.outsider : w.jars.driver;
  const response = (await apiExport.loader(args(getRequest(path, jar), { teamSlug, carId, setupId }))) as Response;
  return { status: response.status, text: await response.text(), disposition: response.headers.get("content-disposition") };
}

async function teamCarCount(): Promise<number> {
  const [row] = await db.select({ n: count() }).from(cars).where(eq(cars.teamId, w.outsider.teamId));
  return Number(row.n);
}

describe("CAR.json import and export over the resource routes", () => {
  it.each(["marlin-sr2.json", "vesper-gt4r.json", "marlin-sr2-no-static.json"])(
    "the demo generator's %s imports and exports back to the same file",
    async (file) => {
      const text = readFileSync(path.join("sample-data/cars", file), "utf8");
      const imported = await importFile(text);
      expect(imported.status).toBe(201);
      const { carId, setupId } = imported.body as { carId: string; setupId: string };
      const exported = await exportText(carId, setupId, true);
      expect(exported.status).toBe(200);
      // RFC 6266: an attachment with a file name, so the browser downloads it.
      expect(exported.disposition).toMatch(/^attachment; filename=".+\.car\.json"$/);
      expect(JSON.parse(exported.text)).toEqual(JSON.parse(text));
      // Byte for byte: the generator writes JSON.stringify(car, null, 2) + "\n" with the CarInput key order
      // (issue #3 §5), and ECMA-262 JSON.stringify keeps insertion order, so the texts must match.
      expect(exported.text).toBe(text);
    },
  );

  it("a file with a typing error is refused with every problem named, and no car is created", async () => {
    const bad = JSON.parse(readFileSync("sample-data/cars/marlin-sr2.json", "utf8"));
    bad.front.motion_ratio = 7;
    bad.rear.bump_stop.gap_mm = -3;
    bad.paint = "blue";
    const before = await teamCarCount();
    const refused = await importFile(JSON.stringify(bad));
    expect(refused.status).toBe(400);
    const errors = (refused.body as { errors: string[] }).errors;
    expect(errors).toHaveLength(3);
    // The engine's CAR.json schema (app/engine/car.ts) names each field, its range and the value read.
    expect(errors.some((e) => e.startsWith("front.motion_ratio must be a number from 0.3 to 1.5") && e.includes("got 7"))).toBe(true);
    expect(errors.some((e) => e.startsWith("rear.bump_stop.gap_mm must be a number from 0 to 150") && e.includes("got -3"))).toBe(true);
    expect(errors.some((e) => e.includes('"paint"'))).toBe(true);
    expect(await teamCarCount()).toBe(before);
  });
});

// Seeded demo cars have no author (created_by null); that tells them from cars users made.
describe("demo Garage", () => {
  it("version 1 of each demo car exports exactly as the generator's car file (same car, same numbers)", async () => {
    for (const [name, file] of [["Marlin SR2", "marlin-sr2.json"], ["Vesper GT4-R", "vesper-gt4r.json"]]) {
      const [car] = await db.select().from(cars).where(and(eq(cars.teamId, w.team.id), eq(cars.name, name), isNull(cars.createdBy)));
      const [v1] = await db.select().from(setups).where(and(eq(setups.carId, car.id), eq(setups.version, 1)));
      const exported = await exportText(car.id, v1.id);
      expect(JSON.parse(exported.text)).toEqual(JSON.parse(readFileSync(`sample-data/cars/${file}`, "utf8")));
    }
  });

  it("seeding again neither duplicates cars nor overwrites what a user changed", async () => {
    const [marlin] = await db.select().from(cars).where(and(eq(cars.teamId, w.team.id), eq(cars.name, "Marlin SR2"), isNull(cars.createdBy)));
    await db.update(cars).set({ cogHeightMm: 395 }).where(eq(cars.id, marlin.id));
    await seedGarage();
    const rows = await db.select().from(cars).where(and(eq(cars.teamId, w.team.id), eq(cars.name, "Marlin SR2")));
    expect(rows).toHaveLength(1);
    expect(rows[0].cogHeightMm).toBe(395);
    const versions = await db.select({ v: setups.version, wing: setups.rearWingAngleDeg }).from(setups).where(eq(setups.carId, marlin.id));
    expect(versions.map((r) => r.v).sort()).toEqual([1, 2, 3]);
    expect(new Set(versions.map((r) => r.wing)).size).toBe(3);
    await db.update(cars).set({ cogHeightMm: marlin.cogHeightMm }).where(eq(cars.id, marlin.id));
  });
});

describe("the CLI reads what the Garage exports", () => {
  it("a setup with a rig-measured bump-stop table exports the table, imports back as a table and runs through the CLI", async () => {
    const [car] = await db.select().from(cars).where(and(eq(cars.teamId, w.team.id), eq(cars.name, "Vesper GT4-R"), isNull(cars.createdBy)));
    const [v3] = await db.select().from(setups).where(and(eq(setups.carId, car.id), eq(setups.version, 3)));
    expect(v3.rearBumpStopKind).toBe("table");
    const exported = await exportText(car.id, v3.id);
    const file = JSON.parse(exported.text);
    expect(file.rear.bump_stop.force_table).toEqual(v3.rearBumpStopTable!.map((p) => ({ deflection_mm: p.deflectionMm, force_n: p.forceN })));
    // Import into another team and export again: the same bytes.
    const imported = await importFile(exported.text);
    expect(imported.status).toBe(201);
    const { carId, setupId } = imported.body as { carId: string; setupId: string };
    const [stored] = await db.select().from(setups).where(eq(setups.id, setupId));
    expect(stored.rearBumpStopKind).toBe("table");
    expect((await exportText(carId, setupId, true)).text).toBe(exported.text);
    const dir = mkdtempSync(path.join(os.tmpdir(), "garage-cli-"));
    writeFileSync(path.join(dir, "CAR.json"), exported.text);
    const cli = spawnSync(
      "npm",
      ["run", "--silent", "analyse", "--", "sample-data/logs/vesper-kestrel-tab.csv", "--car", path.join(dir, "CAR.json"), "--map", "sample-data/logs/vesper-kestrel-tab.map.json"],
      { encoding: "utf8", timeout: 120_000 },
    );
    expect(cli.stderr).toBe("");
    expect(cli.status).toBe(0);
    expect(JSON.parse(cli.stdout).aero.bump_stop_contact_rear_pct).not.toBeNull();
  });


  it("npm run analyse accepts a downloaded CAR.json with a committed demo log (exit 0, one JSON object)", async () => {
    const [car] = await db.select().from(cars).where(and(eq(cars.teamId, w.team.id), eq(cars.name, "Marlin SR2"), isNull(cars.createdBy)));
    const [v3] = await db.select().from(setups).where(and(eq(setups.carId, car.id), eq(setups.version, 3)));
    const exported = await exportText(car.id, v3.id);
    const dir = mkdtempSync(path.join(os.tmpdir(), "garage-cli-"));
    const carFile = path.join(dir, "CAR.json");
    writeFileSync(carFile, exported.text);
    const cli = spawnSync(
      "npm",
      ["run", "--silent", "analyse", "--", "sample-data/logs/marlin-kestrel-comma.csv", "--car", carFile, "--map", "sample-data/logs/marlin-kestrel-comma.map.json"],
      { encoding: "utf8", timeout: 120_000 },
    );
    // The CLI contract (issue #3 §5): exit 0 and one JSON object on stdout with the aero block.
    expect(cli.stderr).toBe("");
    expect(cli.status).toBe(0);
    const summary = JSON.parse(cli.stdout);
    expect(summary.samples).toBeGreaterThan(0);
    expect(summary).toHaveProperty("aero.balance_front_pct");
    expect(Array.isArray(summary.bands)).toBe(true);
  });
});

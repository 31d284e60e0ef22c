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
import * as importPage from "~/routes/garage/import";
import { createCar } from "~/server/garage-cars.server";
import { createSetupSheet } from "~/server/garage-setups.server";
import { seedGarage } from "~/server/seed/garage.server";
import { appUrl, args, formRequest, getRequest, outcome } from "./auth-support";
import { baseSetupValues, garageWorld } from "./garage-support";

type World = Awaited<ReturnType<typeof garageWorld>>;
let w: World;
beforeAll(async () => {
  w = await garageWorld();
});

async function importFile(text: string, setupQuery = "?setup=Round%20trip") {
  // Imported into the rival team (its owner signed in), so the demo team's cars stay the seeded ones.
  const request = new Request(`${appUrl}/api/t/${w.outsider.teamSlug}/cars/import${setupQuery}`, {
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
      // Byte for byte: the generator writes JSON.stringify(car, null, 2) + "\n" with the CarInput key order
      // (issue #3 §5), and ECMA-262 JSON.stringify keeps insertion order, so the texts must match. The Garage adds
      // its own block last: the name given at import, the default fuel density and the import note.
      const { garage, ...analysis } = JSON.parse(exported.text);
      expect(JSON.stringify(analysis, null, 2) + "\n").toBe(text);
      expect(garage).toEqual({ fuel_density_kg_per_l: 0.745, setup_name: "Round trip", change_note: "Imported from a car file" });
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

describe("the Garage's own fields round-trip (issue 12 item 4)", () => {
  const full = {
    category: "Club sports prototype",
    trackFrontMm: 1480,
    trackRearMm: 1455,
    tyreVerticalStiffnessNPerMm: 265,
    fuelTankFromFrontAxleMm: 1320,
    fuelDensityKgPerL: 0.752,
    cornerFlKg: 141.5,
    cornerFrKg: 139.0,
    cornerRlKg: 172.5,
    cornerRrKg: 170.0,
    weighedWithDriver: true,
    weighedFuelL: 20,
    notes: "Scales at Kestrel Bank, driver in, 20 L",
  };
  const setupExtras = {
    rideHeightFrontMm: 42,
    rideHeightRearMm: 61,
    arbFront: "Blade 3",
    arbRear: "Soft tube",
    rearWingAngleDeg: 9.5,
    rearWingStep: "Hole 4",
    frontAero: "Splitter lip 15 mm, dive planes off",
    aeroNotes: "Gurney 8 mm",
    notes: "Hot day set-up",
  };

  async function fullCar() {
    const carId = await createCar(w.team.id, w.userIds.engineer, {
      ...full,
      name: `Round-trip ${Math.random().toString(36).slice(2, 8)}`,
      wheelbaseMm: 2480,
      cogHeightMm: 390,
      steeringRatio: 11,
      // Corner weights as stated: 141.5 + 139 + 172.5 + 170 = 623 kg; front (141.5 + 139) / 623 = 45.02 % (computed by us).
      massKg: 623,
      staticFrontWeightPct: (280.5 / 623) * 100,
    });
    const { setupId } = await createSetupSheet(w.team.id, w.userIds.engineer, carId, "Kestrel Bank dry", {
      ...baseSetupValues,
      ...setupExtras,
      rearBumpStopKind: "table",
      rearBumpStopGapMm: 22,
      rearBumpStopTable: [{ deflectionMm: 4, forceN: 700 }, { deflectionMm: 9, forceN: 1900 }, { deflectionMm: 14, forceN: 3800 }],
      changeNote: "Baseline for the dry",
    });
    return { carId, setupId };
  }

  it("export → import into another team → export gives the same bytes, and every stored field comes back", async () => {
    const { carId, setupId } = await fullCar();
    const first = await exportText(carId, setupId);
    expect(JSON.parse(first.text).garage).toMatchObject({ category: full.category, corner_fl_kg: 141.5, arb_front: "Blade 3", setup_name: "Kestrel Bank dry" });
    const imported = await importFile(first.text, "");
    expect(imported.status).toBe(201);
    const copy = imported.body as { carId: string; setupId: string };
    expect((await exportText(copy.carId, copy.setupId, true)).text).toBe(first.text);
    const strip = <T extends Record<string, unknown>>(row: T) => {
      const { id: _i, teamId: _t, carId: _c, sheetId: _s, createdBy: _b, createdAt: _a, updatedAt: _u, ...rest } = row;
      return rest;
    };
    const [srcCar] = await db.select().from(cars).where(eq(cars.id, carId));
    const [dstCar] = await db.select().from(cars).where(eq(cars.id, copy.carId));
    expect(strip(dstCar)).toEqual(strip(srcCar));
    const [srcSetup] = await db.select().from(setups).where(eq(setups.id, setupId));
    const [dstSetup] = await db.select().from(setups).where(eq(setups.id, copy.setupId));
    expect(strip(dstSetup)).toEqual(strip(srcSetup));
    console.log("tried: a car with every Garage field through export and import; held: same bytes, same stored rows");
  });

  it("re-importing a car that is already here offers the next version of its setup, not a second car", async () => {
    const { carId, setupId } = await fullCar();
    const [{ sheetId }] = await db.select({ sheetId: setups.sheetId }).from(setups).where(eq(setups.id, setupId));
    const file = JSON.parse((await exportText(carId, setupId)).text);
    const carsBefore = await db.select({ n: count() }).from(cars).where(eq(cars.teamId, w.team.id));
    // The import page: the first post offers the choice and stores nothing.
    const pagePath = `/t/${w.team.slug}/garage/import`;
    const offered = await outcome(() => importPage.action(args(formRequest(pagePath, { text: JSON.stringify(file), setupName: "" }, w.jars.engineer), { teamSlug: w.team.slug })));
    expect(offered.status).toBe(200);
    const offer = (offered.body as { offer: { cars: Array<{ id: string; sheets: Array<{ id: string; latestVersion: number }> }> } }).offer;
    expect(offer.cars.map((c) => c.id)).toEqual([carId]);
    expect(offer.cars[0].sheets).toEqual([expect.objectContaining({ id: sheetId, latestVersion: 1 })]);
    // Same file again onto the sheet: nothing differs, so nothing is written.
    const same = await outcome(() => importPage.action(args(formRequest(pagePath, { text: JSON.stringify(file), onto: `sheet:${carId}:${sheetId}` }, w.jars.engineer), { teamSlug: w.team.slug })));
    expect(same.status).toBe(302);
    expect(same.location).toContain(`/setups/${setupId}?saved=unchanged`);
    // A changed wing angle becomes v2 of the same sheet, with its own change note; v1 stays.
    file.garage.rear_wing_angle_deg = 11;
    file.rear.spring_rate_n_per_mm = 130;
    const next = await outcome(() => importPage.action(args(formRequest(pagePath, { text: JSON.stringify(file), onto: `sheet:${carId}:${sheetId}` }, w.jars.engineer), { teamSlug: w.team.slug })));
    expect(next.status).toBe(302);
    expect(next.location).toMatch(/\?saved=v2$/);
    const versions = await db.select().from(setups).where(eq(setups.sheetId, sheetId));
    expect(versions.map((v) => [v.version, v.rearWingAngleDeg, v.rearSpringRateNPerMm]).sort()).toEqual([[1, 9.5, 120], [2, 11, 130]]);
    expect(versions.find((v) => v.version === 2)!.changeNote).toBe("Re-imported from a car file");
    const carsAfter = await db.select({ n: count() }).from(cars).where(eq(cars.teamId, w.team.id));
    expect(carsAfter).toEqual(carsBefore);
    console.log("tried: the same car file imported twice into its own team; held: a choice first, then v2 on the same sheet, no second car");
  });

  it("the import API writes the next version with ?car=&sheet=, and 404s another team's car", async () => {
    const { carId, setupId } = await fullCar();
    const [{ sheetId }] = await db.select({ sheetId: setups.sheetId }).from(setups).where(eq(setups.id, setupId));
    const file = JSON.parse((await exportText(carId, setupId)).text);
    file.front.motion_ratio = 0.95;
    const post = (team: string, jar: typeof w.jars.engineer) =>
      outcome(() =>
        apiImport.action(
          args(
            new Request(`${appUrl}/api/t/${team}/cars/import?car=${carId}&sheet=${sheetId}`, {
              method: "POST",
              headers: { origin: appUrl, cookie: jar.header(), "content-type": "application/json" },
              body: JSON.stringify(file),
            }),
            { teamSlug: team },
          ),
        ),
      );
    const created = await post(w.team.slug, w.jars.engineer);
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ version: 2, unchanged: false, carDifferences: [] });
    const rival = await post(w.outsider.teamSlug, w.jars.outsider);
    expect(rival.status).toBe(404);
  });
});

// Seeded demo cars have no author (created_by null); that tells them from cars users made.
describe("demo Garage", () => {
  it("version 1 of each demo car exports exactly as the generator's car file (same car, same numbers)", async () => {
    for (const [name, file] of [["Marlin SR2", "marlin-sr2.json"], ["Vesper GT4-R", "vesper-gt4r.json"]]) {
      const [car] = await db.select().from(cars).where(and(eq(cars.teamId, w.team.id), eq(cars.name, name), isNull(cars.createdBy)));
      const [v1] = await db.select().from(setups).where(and(eq(setups.carId, car.id), eq(setups.version, 1)));
      const exported = await exportText(car.id, v1.id);
      const { garage, ...analysis } = JSON.parse(exported.text);
      expect(analysis).toEqual(JSON.parse(readFileSync(`sample-data/cars/${file}`, "utf8")));
      expect(garage.setup_name).toBeTruthy();
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
    // Import into another team (under the file's own setup name) and export again: the same bytes.
    const imported = await importFile(exported.text, "");
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

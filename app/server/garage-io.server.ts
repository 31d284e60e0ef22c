/**
 * CAR.json out of and into the Garage. Export: a car plus one chosen setup version, the analysis' keys and
 * the `garage` block with everything else the Garage holds. Import: a car file becomes a new car with a
 * setup sheet at version 1, or (a re-import) the next version of a sheet of a car already in the team.
 * A refused file changes nothing.
 */
import { randomUUID } from "node:crypto";
import { and, eq } from "drizzle-orm";
import { cars, setupSheets, setups, type Setup } from "../db/schema/garage";
import { carInputToText, fromCarInput, parseCarInputText, toCarInput, type CarFile } from "../lib/garage/car-json";
import { CAR_FIELDS } from "../lib/garage/fields";
import { diffSetups } from "../lib/garage/diff";
import { getCar } from "./garage-cars.server";
import { getSetup, createSetupSheet, listSetupSheets, saveSetupEdit } from "./garage-setups.server";
import { recordAudit } from "./audit.server";
import { db } from "./db.server";
import { parseJsonBounded } from "./body.server";

/** Car files are a few hundred bytes; anything larger than this is not one. */
export const MAX_CAR_FILE_BYTES = 64 * 1024;
/** A car file nests four levels (car → axle → bump_stop → force_table rows); eight is generous. */
const MAX_CAR_FILE_DEPTH = 8;

/** The setup's name typed for an import: normalised (NFC, trimmed), at most 80 characters; null when empty. */
export function setupNameOf(value: string | null | undefined): string | null {
  const name = (value ?? "").normalize("NFC").trim().slice(0, 80).trim();
  return name || null;
}

/** Every string in a parsed JSON value NFC-normalised and trimmed, so what is validated is what is stored. */
function normaliseStrings(value: unknown): unknown {
  if (typeof value === "string") return value.normalize("NFC").trim();
  if (Array.isArray(value)) return value.map(normaliseStrings);
  if (value && typeof value === "object") {
    return Object.fromEntries(Object.entries(value as Record<string, unknown>).map(([k, v]) => [k, normaliseStrings(v)]));
  }
  return value;
}

export async function exportCarInput(teamId: string, carId: string, setupId: string): Promise<{ car: CarFile; fileName: string }> {
  const car = await getCar(teamId, carId);
  const setup = await getSetup(teamId, carId, setupId);
  const fileName = `${slug(car.name)}-${slug(setup.sheetName)}-v${setup.version}.car.json`;
  return { car: toCarInput(car, setup), fileName };
}

export function carFileResponse(car: CarFile, fileName: string): Response {
  return new Response(carInputToText(car), {
    headers: {
      "Content-Type": "application/json; charset=utf-8",
      "Content-Disposition": `attachment; filename="${fileName}"`,
      "Cache-Control": "no-store",
    },
  });
}

export type ImportOutcome =
  | { ok: true; carId: string; setupId: string; version: number; unchanged?: boolean; carDifferences?: string[] }
  | { ok: false; errors: string[]; status?: number };

/** Where an import goes: a new car (the default), or the next version of a sheet of a car already in the team. */
export type ImportTarget = { kind: "new-car" } | { kind: "new-version"; carId: string; sheetId: string } | { kind: "new-sheet"; carId: string };

/** A car file checked and read into stored values, or every problem with it. */
export function readCarFile(text: string): { ok: true; file: ReturnType<typeof fromCarInput>; name: string } | { ok: false; errors: string[] } {
  const bounded = parseJsonBounded(text.replace(/^\uFEFF/, ""), MAX_CAR_FILE_DEPTH);
  if (!bounded.ok) return { ok: false, errors: [bounded.message.replace("The text", "The file")] };
  const parsed = parseCarInputText(JSON.stringify(normaliseStrings(bounded.value)));
  if (!parsed.ok) return parsed;
  return { ok: true, file: fromCarInput(parsed.car), name: parsed.car.name };
}

/** Cars of the team with the file's name (a re-import), each with its setup sheets, for the import page to offer. */
export async function carsNamed(teamId: string, name: string) {
  const rows = await db.select({ id: cars.id, name: cars.name }).from(cars).where(and(eq(cars.teamId, teamId), eq(cars.name, name)));
  const out = [];
  for (const car of rows) {
    const sheets = await listSetupSheets(teamId, car.id);
    out.push({ ...car, sheets: sheets.map((s) => ({ id: s.sheetId, name: s.name, latestVersion: Number(s.latestVersion), latestSetupId: s.setupId })) });
  }
  return out;
}

/**
 * Imports a car file. `setupName` (typed by the person importing) wins over the file's own setup name, then
 * "Imported". A new car is written in one transaction with its audit event; a re-import onto a car already in
 * the team writes the next version of the chosen sheet (nothing when no setup value differs) and leaves the
 * car's own values alone, listing those that differ from the file.
 */
export async function importCarFile(
  teamId: string,
  userId: string | null,
  text: string,
  setupName: string | null = null,
  target: ImportTarget = { kind: "new-car" },
): Promise<ImportOutcome> {
  const read = readCarFile(text);
  if (!read.ok) return read;
  const { car, setup } = read.file;
  const { sheetName: fileSheetName, ...setupValues } = setup;
  const sheetName = setupName ?? fileSheetName ?? "Imported";
  if (target.kind === "new-car") {
    const carRow = { ...car, fuelDensityKgPerL: car.fuelDensityKgPerL ?? DEFAULT_FUEL_DENSITY_KG_PER_L };
    const carId = randomUUID();
    const sheetId = randomUUID();
    const setupId = randomUUID();
    const now = new Date();
    await db.transaction(async (tx) => {
      await tx.insert(cars).values({ ...carRow, id: carId, teamId, createdBy: userId, createdAt: now, updatedAt: now });
      await tx.insert(setupSheets).values({ id: sheetId, teamId, carId, name: sheetName, createdBy: userId, createdAt: now });
      await tx.insert(setups).values({
        ...setupValues,
        changeNote: setupValues.changeNote ?? "Imported from a car file",
        id: setupId, sheetId, teamId, carId, version: 1, createdBy: userId, createdAt: now, updatedAt: now,
      });
      await recordAudit(tx, { teamId, actorUserId: userId, action: "car_imported", subjectType: "car", subjectId: carId, detail: { car: car.name, setup: sheetName } });
    });
    return { ok: true, carId, setupId, version: 1 };
  }
  const stored = await getCar(teamId, target.carId);
  const carDifferences = differingCarFields(stored, car);
  if (target.kind === "new-sheet") {
    const { setupId } = await createSetupSheet(teamId, userId, target.carId, sheetName, { ...setupValues, changeNote: setupValues.changeNote ?? "Imported from a car file" });
    return { ok: true, carId: target.carId, setupId, version: 1, carDifferences };
  }
  const sheets = await listSetupSheets(teamId, target.carId);
  const sheet = sheets.find((s) => s.sheetId === target.sheetId);
  if (!sheet) return { ok: false, errors: ["That setup sheet is not on this car any more; choose again."], status: 404 };
  const latest = await getSetup(teamId, target.carId, sheet.setupId);
  if (diffSetups(latest, { ...latest, ...setupValues } as Setup, "metric").length === 0)
    return { ok: true, carId: target.carId, setupId: latest.id, version: latest.version, unchanged: true, carDifferences };
  const saved = await saveSetupEdit({
    teamId, userId, carId: target.carId, setupId: latest.id, sheetName: sheet.name,
    values: { ...setupValues, changeNote: "Re-imported from a car file" },
  });
  return { ok: true, carId: target.carId, setupId: saved.setupId, version: saved.version, carDifferences };
}

const DEFAULT_FUEL_DENSITY_KG_PER_L = 0.745;

/** Labels of the car's own fields whose stored value differs from the file's (a re-import does not change them). */
function differingCarFields(stored: object, fromFile: object): string[] {
  const a = stored as Record<string, unknown>;
  const b = fromFile as Record<string, unknown>;
  const out: string[] = [];
  for (const [key, spec] of Object.entries(CAR_FIELDS)) {
    if (!(key in b) || (key === "fuelDensityKgPerL" && b[key] === null)) continue;
    if ((a[key] ?? null) !== (b[key] ?? null)) out.push(spec.label);
  }
  if (Boolean(a.weighedWithDriver) !== Boolean(b.weighedWithDriver)) out.push("Weighed with driver");
  return out;
}

function slug(text: string): string {
  return (
    text
      .normalize("NFKD")
      .replace(/[^\w\s-]/g, "")
      .trim()
      .toLowerCase()
      .replace(/[\s_-]+/g, "-")
      .slice(0, 40) || "car"
  );
}

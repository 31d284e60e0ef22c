/**
 * CAR.json out of and into the Garage. Export: a car plus one chosen setup version, exactly the
 * CarInput keys. Import: a car file becomes a new car (no corner weights; mass and front % as
 * stated) with a setup sheet at version 1. A refused file changes nothing.
 */
import { eq } from "drizzle-orm";
import type { CarInput } from "../engine/types";
import { cars } from "../db/schema/garage";
import { carInputToText, fromCarInput, parseCarInputText, toCarInput } from "../lib/garage/car-json";
import { getCar, createCar } from "./garage-cars.server";
import { getSetup, createSetupSheet } from "./garage-setups.server";
import { db } from "./db.server";
import { parseJsonBounded } from "./body.server";

/** Car files are a few hundred bytes; anything larger than this is not one. */
export const MAX_CAR_FILE_BYTES = 64 * 1024;
/** A car file nests four levels (car → axle → bump_stop → force_table rows); eight is generous. */
const MAX_CAR_FILE_DEPTH = 8;

/** The setup's name for an import: normalised (NFC, trimmed) and at most 80 characters; "Imported" when empty. */
export function setupNameOf(value: string | null | undefined): string {
  const name = (value ?? "").normalize("NFC").trim().slice(0, 80).trim();
  return name || "Imported";
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

export async function exportCarInput(teamId: string, carId: string, setupId: string): Promise<{ car: CarInput; fileName: string }> {
  const car = await getCar(teamId, carId);
  const setup = await getSetup(teamId, carId, setupId);
  const fileName = `${slug(car.name)}-${slug(setup.sheetName)}-v${setup.version}.car.json`;
  return { car: toCarInput(car, setup), fileName };
}

export function carFileResponse(car: CarInput, fileName: string): Response {
  return new Response(carInputToText(car), {
    headers: {
      "Content-Type": "application/json; charset=utf-8",
      "Content-Disposition": `attachment; filename="${fileName}"`,
      "Cache-Control": "no-store",
    },
  });
}

export type ImportOutcome = { ok: true; carId: string; setupId: string } | { ok: false; errors: string[] };

export async function importCarFile(teamId: string, userId: string | null, text: string, setupName = "Imported"): Promise<ImportOutcome> {
  const bounded = parseJsonBounded(text.replace(/^\uFEFF/, ""), MAX_CAR_FILE_DEPTH);
  if (!bounded.ok) return { ok: false, errors: [bounded.message.replace("The text", "The file")] };
  const parsed = parseCarInputText(JSON.stringify(normaliseStrings(bounded.value)));
  if (!parsed.ok) return parsed;
  const { car, setup } = fromCarInput(parsed.car);
  // The car is removed again if its setup cannot be stored, so a failed import leaves nothing behind.
  const carId = await createCar(teamId, userId, {
    ...car,
    category: null,
    trackFrontMm: null,
    trackRearMm: null,
    tyreVerticalStiffnessNPerMm: null,
    fuelTankFromFrontAxleMm: car.fuelTankFromFrontAxleMm ?? null,
    fuelDensityKgPerL: 0.745,
    cornerFlKg: null,
    cornerFrKg: null,
    cornerRlKg: null,
    cornerRrKg: null,
    weighedWithDriver: false,
    weighedFuelL: null,
    notes: null,
  });
  try {
    const { setupId } = await createSetupSheet(teamId, userId, carId, setupName, { ...setup, changeNote: "Imported from a car file" });
    return { ok: true, carId, setupId };
  } catch (error) {
    await db.delete(cars).where(eq(cars.id, carId));
    throw error;
  }
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

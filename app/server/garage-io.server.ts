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
  const parsed = parseCarInputText(text);
  if (!parsed.ok) return parsed;
  const { car, setup } = fromCarInput(parsed.car);
  // The car is removed again if its setup cannot be stored, so a failed import leaves nothing behind.
  const carId = await createCar(teamId, userId, {
    ...car,
    category: null,
    trackFrontMm: null,
    trackRearMm: null,
    tyreVerticalStiffnessNPerMm: null,
    fuelTankFromFrontAxleMm: null,
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

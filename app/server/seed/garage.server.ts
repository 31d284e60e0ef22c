/**
 * Demo Garage for the invented scenario: Harrowgate Motor Club's two fictional cars, each with a
 * setup sheet of a few versions that differ in wing and spring settings. Version 1 of each holds
 * the same car data as the demo generator's car files in sample-data/cars/. Idempotent: a car that
 * already exists by name is left exactly as it is (edits made in the app stay).
 */
import { and, eq } from "drizzle-orm";
import { organization } from "../../db/schema/auth";
import { cars } from "../../db/schema/garage";
import type { SetupValues } from "../garage-setups.server";
import { createSetupSheet, saveSetupEdit } from "../garage-setups.server";
import { createCar } from "../garage-cars.server";
import { summariseCornerWeights } from "../../lib/garage/corner-weights";
import { db } from "../db.server";
import { DEMO_TEAM } from "./users.server";

type DemoCar = {
  car: Parameters<typeof createCar>[2];
  sheetName: string;
  versions: Array<Partial<SetupValues> & { changeNote: string }>;
  base: SetupValues;
};

const none = {
  frontBumpStopTable: null,
  rearBumpStopTable: null,
  frontBumpStopRateNPerMm: null,
  rearBumpStopRateNPerMm: null,
  aeroNotes: null,
  notes: null,
} as const;

function withCorners(fl: number, fr: number, rl: number, rr: number) {
  const s = summariseCornerWeights({ fl, fr, rl, rr });
  return { cornerFlKg: fl, cornerFrKg: fr, cornerRlKg: rl, cornerRrKg: rr, massKg: s.totalKg, staticFrontWeightPct: s.staticFrontPct };
}

export const DEMO_CARS: DemoCar[] = [
  {
    car: {
      name: "Marlin SR2",
      category: "Club sports-racer",
      wheelbaseMm: 2450,
      trackFrontMm: 1480,
      trackRearMm: 1450,
      cogHeightMm: 380,
      steeringRatio: 11.5,
      tyreVerticalStiffnessNPerMm: 280,
      fuelTankFromFrontAxleMm: 1350,
      fuelDensityKgPerL: 0.745,
      ...withCorners(131, 129.4, 180.2, 179.4), // 620 kg with driver, 42 % front (as sample-data/cars/marlin-sr2.json)
      weighedWithDriver: true,
      weighedFuelL: 30,
      notes: "Invented demo car. Scales at the Kestrel Bank Raceway paddock, driver in, 30 L.",
    },
    sheetName: "Kestrel Bank baseline",
    base: {
      ...none,
      frontSpringRateNPerMm: 100,
      rearSpringRateNPerMm: 120,
      frontMotionRatio: 0.95,
      rearMotionRatio: 0.9,
      frontBumpStopKind: "linear",
      frontBumpStopGapMm: 9,
      frontBumpStopRateNPerMm: 250,
      rearBumpStopKind: "linear",
      rearBumpStopGapMm: 14,
      rearBumpStopRateNPerMm: 300,
      staticDamperFlMm: 31.2,
      staticDamperFrMm: 29.8,
      staticDamperRlMm: 35.5,
      staticDamperRrMm: 36.1,
      rideHeightFrontMm: 55,
      rideHeightRearMm: 70,
      arbFront: "Blade 2 of 5",
      arbRear: "Disconnected",
      rearWingAngleDeg: 6,
      rearWingStep: null,
      frontAero: "Splitter flat, no dive planes",
      changeNote: "Baseline from the last club round",
    },
    versions: [
      { rearWingAngleDeg: 9, rearSpringRateNPerMm: 135, changeNote: "More wing and rear spring for the fast sweepers" },
      { rearWingAngleDeg: 12, frontSpringRateNPerMm: 110, frontAero: "Splitter flat, small dive planes", changeNote: "Balance the extra wing at the front" },
    ],
  },
  {
    car: {
      name: "Vesper GT4-R",
      category: "Closed GT",
      wheelbaseMm: 2600,
      trackFrontMm: 1620,
      trackRearMm: 1600,
      cogHeightMm: 480,
      steeringRatio: 14,
      tyreVerticalStiffnessNPerMm: 320,
      fuelTankFromFrontAxleMm: 1700,
      fuelDensityKgPerL: 0.745,
      ...withCorners(345.5, 343, 331, 330.5), // 1350 kg with driver, 51 % front (as sample-data/cars/vesper-gt4r.json)
      weighedWithDriver: true,
      weighedFuelL: 50,
      notes: "Invented demo car. Weighed before the Coldwater Ridge hill-climb, driver in, 50 L.",
    },
    sheetName: "Kestrel Bank dry",
    base: {
      ...none,
      frontSpringRateNPerMm: 160,
      rearSpringRateNPerMm: 180,
      frontMotionRatio: 0.8,
      rearMotionRatio: 0.75,
      frontBumpStopKind: "linear",
      frontBumpStopGapMm: 12,
      frontBumpStopRateNPerMm: 500,
      rearBumpStopKind: "linear",
      rearBumpStopGapMm: 25,
      rearBumpStopRateNPerMm: 400,
      staticDamperFlMm: null,
      staticDamperFrMm: null,
      staticDamperRlMm: null,
      staticDamperRrMm: null,
      rideHeightFrontMm: 75,
      rideHeightRearMm: 88,
      arbFront: "Position 3",
      arbRear: "Position 2",
      rearWingAngleDeg: 5,
      rearWingStep: "Hole 3 of 6",
      frontAero: "Splitter lip standard",
      changeNote: "Homologation baseline",
    },
    versions: [
      { rearWingAngleDeg: 7, rearWingStep: "Hole 4 of 6", changeNote: "One hole more rear wing" },
      {
        rearWingAngleDeg: 7,
        rearWingStep: "Hole 4 of 6",
        frontSpringRateNPerMm: 180,
        rearBumpStopKind: "table",
        rearBumpStopRateNPerMm: null,
        rearBumpStopTable: [
          { deflectionMm: 5, forceN: 900 },
          { deflectionMm: 10, forceN: 2200 },
          { deflectionMm: 15, forceN: 4000 },
        ],
        changeNote: "Stiffer front springs; progressive rear packer measured on the rig",
      },
    ],
  },
];

export async function seedGarage(): Promise<void> {
  const [team] = await db.select({ id: organization.id }).from(organization).where(eq(organization.slug, DEMO_TEAM.slug)).limit(1);
  if (!team) return;
  for (const demo of DEMO_CARS) {
    const [existing] = await db
      .select({ id: cars.id })
      .from(cars)
      .where(and(eq(cars.teamId, team.id), eq(cars.name, demo.car.name)))
      .limit(1);
    if (existing) continue;
    const carId = await createCar(team.id, null, demo.car);
    const first = await createSetupSheet(team.id, null, carId, demo.sheetName, demo.base);
    let values = demo.base;
    let setupId = first.setupId;
    for (const change of demo.versions) {
      values = { ...values, ...change };
      const saved = await saveSetupEdit({ teamId: team.id, userId: null, carId, setupId, sheetName: demo.sheetName, values });
      setupId = saved.setupId;
    }
  }
}

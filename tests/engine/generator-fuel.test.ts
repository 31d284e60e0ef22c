import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { LOGS } from "../../sample-data/generate";

// The demo generator splits the fuel burn over the axles by the tank position in the car file the
// log is analysed with, so a run with the fuel given is judged against the same tank the engine uses.
// Lever rule about the rear axle (common practice): front share = 1 − x_tank / L.
const ROOT = join(__dirname, "..", "..");

describe.each(LOGS.map((l) => l.file))("generator fuel split: %s", (file) => {
  it("puts the burnt fuel's weight on the axles as the car file's tank position says", () => {
    const base = file.replace(/\.csv$/, "");
    const truth = JSON.parse(readFileSync(join(ROOT, "sample-data", "logs", `${base}.truth.json`), "utf8"));
    const car = JSON.parse(readFileSync(join(ROOT, "sample-data", "logs", truth.car_file), "utf8"));
    expect(car.fuel_tank_from_front_axle_mm).toBeGreaterThan(0);
    const front = truth.static_load_change_front_n, rear = truth.static_load_change_rear_n;
    // The whole burn's weight, 9.80665 m/s² (standard gravity, ISO 80000-3).
    expect(front + rear).toBeCloseTo(-truth.fuel_burnt_kg * 9.80665, 1);
    expect(front / (front + rear)).toBeCloseTo(1 - car.fuel_tank_from_front_axle_mm / car.wheelbase_mm, 3);
  });
});

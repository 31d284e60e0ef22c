/**
 * Bump stops / packers. A stop is a gap (damper travel from static to contact) and either a linear
 * rate at the damper or a force/deflection table measured from contact, also at the damper.
 * The car file carries a table as it is (the engine interpolates it) and, for tools that read one rate,
 * its least-squares rate through zero.
 */
import { CAR_LIMITS } from "~/engine/car";
import { NOT_A_NUMBER, fromStored, parseTypedNumber, toStored, type UnitSystem } from "./units";

export interface BumpStopPoint {
  deflectionMm: number;
  forceN: number;
}

/** Parses "deflection force" lines (space, tab, ";" or "," between the two); returns a message on error. */
export function parseBumpStopTable(text: string, system: UnitSystem): BumpStopPoint[] | string {
  const points: BumpStopPoint[] = [];
  const lines = text.split(/\r?\n/).map((l) => l.trim()).filter((l) => l !== "");
  for (const [i, line] of lines.entries()) {
    const cells = line.split(/[\s;,]+/).filter((c) => c !== "");
    const nums = cells.map((c) => parseTypedNumber(c));
    if (cells.length !== 2 || nums.some((n) => n === NOT_A_NUMBER || n === undefined)) {
      return `Bump-stop table line ${i + 1} ("${line}"): write two numbers, deflection then force.`;
    }
    points.push({
      deflectionMm: toStored(nums[0] as number, "length", system),
      forceN: toStored(nums[1] as number, "force", system),
    });
  }
  return points;
}

export function bumpStopTableProblem(points: BumpStopPoint[]): string | undefined {
  if (points.length < 2) return "A bump-stop table needs at least two rows.";
  if (points.length > 40) return "A bump-stop table holds at most 40 rows.";
  for (let i = 0; i < points.length; i++) {
    const p = points[i];
    if (p.deflectionMm < 0 || p.forceN < 0) return `Bump-stop table row ${i + 1}: deflection and force cannot be negative.`;
    // The car file's own bounds (the engine's CAR_LIMITS), so every table the form keeps exports to a file the
    // import and the CLI read back.
    const [, maxDeflection] = CAR_LIMITS.bump_table_deflection_mm;
    const [, maxForce] = CAR_LIMITS.bump_table_force_n;
    if (p.deflectionMm > maxDeflection) return `Bump-stop table row ${i + 1}: deflection ${p.deflectionMm} mm is past the ${maxDeflection} mm a stop can travel.`;
    if (p.forceN > maxForce) return `Bump-stop table row ${i + 1}: force ${p.forceN} N is above ${maxForce} N at the damper. Check the units of the rows.`;
    if (i > 0 && p.deflectionMm <= points[i - 1].deflectionMm)
      return `Bump-stop table row ${i + 1}: deflections must increase from row to row.`;
    if (i > 0 && p.forceN < points[i - 1].forceN) return `Bump-stop table row ${i + 1}: force must not fall as the stop compresses.`;
  }
  if (points.every((p) => p.forceN === 0)) return "A bump-stop table with zero force everywhere is not a stop.";
  return undefined;
}

/** Least-squares rate through the origin, k = Σ(F·x) / Σ(x²), in N/mm. */
export function linearRateFromTable(points: BumpStopPoint[]): number {
  let fx = 0;
  let xx = 0;
  for (const p of points) {
    fx += p.forceN * p.deflectionMm;
    xx += p.deflectionMm * p.deflectionMm;
  }
  return fx / xx;
}

export function formatBumpStopTable(points: BumpStopPoint[] | null, system: UnitSystem): string {
  if (!points) return "";
  const show = (v: number, q: "length" | "force") => String(Number(fromStored(v, q, system).toPrecision(6)));
  return points.map((p) => `${show(p.deflectionMm, "length")} ${show(p.forceN, "force")}`).join("\n");
}

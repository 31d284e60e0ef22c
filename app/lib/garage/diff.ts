/**
 * Differences between two setup versions: one row per field that changed, with both values in the
 * chosen unit system. Values compare in stored units, so a field typed in inches and saved again
 * unchanged does not show up.
 */
import { SETUP_FIELDS, type FieldSpec, type SetupFieldKey } from "./fields";
import { formatBumpStopTable, type BumpStopPoint } from "./bump-stop";
import { fromStored, unitLabel, type UnitSystem } from "./units";
import type { BumpStopKind } from "./schemas";

export type SetupComparable = { [K in Exclude<SetupFieldKey, "name" | "changeNote">]: number | string | null } & {
  frontBumpStopKind: BumpStopKind;
  rearBumpStopKind: BumpStopKind;
  frontBumpStopTable: BumpStopPoint[] | null;
  rearBumpStopTable: BumpStopPoint[] | null;
};

export interface DiffRow {
  field: string;
  label: string;
  before: string;
  after: string;
  unit: string;
}

const DECIMALS: Record<string, number> = { ratio: 3, springRate: 1, length: 1, angle: 1, mass: 1, force: 0 };

/** A value as a table shows it (unit in its own column). */
export function showValue(spec: FieldSpec, value: number | string | null, system: UnitSystem): string {
  if (value === null || value === "") return "—";
  if (spec.kind === "text" || typeof value === "string") return String(value);
  const decimals = DECIMALS[spec.quantity] ?? 2;
  return fromStored(value, spec.quantity, system).toFixed(decimals);
}

const KIND_LABEL: Record<BumpStopKind, string> = { none: "none", linear: "gap + rate", table: "gap + table" };

export function diffSetups(before: SetupComparable, after: SetupComparable, system: UnitSystem): DiffRow[] {
  const rows: DiffRow[] = [];
  for (const [key, spec] of Object.entries(SETUP_FIELDS) as [SetupFieldKey, FieldSpec][]) {
    if (key === "name" || key === "changeNote") continue;
    const a = before[key];
    const b = after[key];
    if (a === b) continue;
    rows.push({
      field: key,
      label: spec.label,
      before: showValue(spec, a, system),
      after: showValue(spec, b, system),
      unit: spec.kind === "number" ? unitLabel(spec.quantity, system) : "",
    });
  }
  for (const axle of ["front", "rear"] as const) {
    const label = axle === "front" ? "Front" : "Rear";
    const kindA = before[`${axle}BumpStopKind`];
    const kindB = after[`${axle}BumpStopKind`];
    if (kindA !== kindB)
      rows.push({ field: `${axle}BumpStopKind`, label: `${label} bump stop`, before: KIND_LABEL[kindA], after: KIND_LABEL[kindB], unit: "" });
    const tableA = formatBumpStopTable(before[`${axle}BumpStopTable`], system);
    const tableB = formatBumpStopTable(after[`${axle}BumpStopTable`], system);
    if (tableA !== tableB)
      rows.push({
        field: `${axle}BumpStopTable`,
        label: `${label} bump-stop table`,
        before: tableA.replaceAll("\n", "; ") || "—",
        after: tableB.replaceAll("\n", "; ") || "—",
        unit: system === "metric" ? "mm N" : "in lbf",
      });
  }
  return rows;
}

/** One line for a setup's history: "Rear wing angle 8.0 → 10.0 deg; Front spring rate …". */
export function summariseDiff(rows: DiffRow[], limit = 3): string {
  if (rows.length === 0) return "no field changed";
  const parts = rows.slice(0, limit).map((r) => `${r.label} ${r.before} → ${r.after}${r.unit ? " " + r.unit : ""}`);
  return parts.join("; ") + (rows.length > limit ? `; +${rows.length - limit} more` : "");
}

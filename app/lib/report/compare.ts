/**
 * Compare, the parts both sides use: the band pivot (sessions side by side; plain functions, see
 * DEVELOPERS.md on why not arquero), loads normalised to standard air, and the sentence that sets a
 * setup change beside what the balance did.
 */
import type { SessionComparison } from "~/engine/compare";
import type { DiffRow } from "~/lib/garage/diff";
import { summariseDiff } from "~/lib/garage/diff";
import { bandLabel, fmt, signed } from "./format";

/** ISA sea-level density (ISO 2533), the reference loads are normalised to. */
export const STANDARD_DENSITY_KG_M3 = 1.225;

/** An aero load measured in air of `densityKgM3`, as it would be in standard air (load ∝ ρ at a given speed). */
export function loadAtStandardAir(loadN: number | null, densityKgM3: number): number | null {
  return loadN === null ? null : (loadN * STANDARD_DENSITY_KG_M3) / densityKgM3;
}

export interface CompareBand {
  min_kmh: number;
  max_kmh: number;
  mean_speed_kmh: number | null;
  balance_front_pct: number | null;
  balance_front_ci95_pct: [number, number] | null;
  understeer_gradient_deg_per_g: number | null;
  understeer_ci95_deg_per_g: [number, number] | null;
  aero_load_front_n_std_air: number | null;
  aero_load_rear_n_std_air: number | null;
}

export interface PivotRow {
  band: string;
  min_kmh: number;
  max_kmh: number;
  /** One cell per session, in the order given (null where that session lacks the band). */
  cells: (CompareBand | null)[];
}

/** Bands as rows, sessions as columns; rows in speed order, a band present in any session gets a row. */
export function pivotBands(sessions: { bands: CompareBand[] }[]): PivotRow[] {
  const keys = new Map<string, { min: number; max: number }>();
  for (const s of sessions) for (const b of s.bands) keys.set(`${b.min_kmh}:${b.max_kmh}`, { min: b.min_kmh, max: b.max_kmh });
  return [...keys.values()]
    .sort((a, b) => a.min - b.min || a.max - b.max)
    .map(({ min, max }) => ({
      band: bandLabel({ min_kmh: min, max_kmh: max }),
      min_kmh: min,
      max_kmh: max,
      cells: sessions.map((s) => s.bands.find((b) => b.min_kmh === min && b.max_kmh === max) ?? null),
    }));
}

/**
 * "Rear wing angle 5.0 → 7.0 deg → balance −1.9 points at 160–200 km/h (clear)": one line per band
 * whose balance or understeer gradient changed clearly; one line saying so when none did.
 */
export function changeSentences(setupRows: DiffRow[], c: SessionComparison): string[] {
  const setup = setupRows.length === 0 ? "Same setup" : summariseDiff(setupRows, 2);
  const out: string[] = [];
  for (const b of c.bands) {
    const parts: string[] = [];
    if (b.balance_front_pct.clear && b.balance_front_pct.change !== null) parts.push(`balance ${signed(b.balance_front_pct.change, 1)} points`);
    if (b.understeer_gradient_deg_per_g.clear && b.understeer_gradient_deg_per_g.change !== null) parts.push(`understeer gradient ${signed(b.understeer_gradient_deg_per_g.change, 2)} deg/g`);
    if (parts.length) out.push(`${setup} → ${parts.join(", ")} at ${bandLabel(b)} km/h (clear)`);
  }
  if (out.length === 0) out.push(`${setup} → no clear change of balance or understeer gradient in any speed band`);
  return out;
}

export { fmt };

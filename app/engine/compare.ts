/**
 * Two sessions side by side (a wing or splitter change, another day): each figure's change b − a
 * with an approximate 95 % interval, so a change can be told from the noise of one stint.
 *
 * The two sessions are independent stints, so their standard errors add in quadrature; each
 * interval's half-width stands in for 1.96 standard errors (t ≈ 1.96 with the block counts a stint
 * gives), so the combined half-width is √(h_a² + h_b²). A change is "clear" when its interval
 * excludes zero. The intervals cover the stint-to-stint noise of each figure, not model bias common
 * to both sessions, which a difference mostly cancels. At 95 % about one clear change in twenty
 * comparisons is noise: read a single clear band with that in mind.
 */
import type { SessionSummary } from "./summary-types";

export interface Change {
  a: number | null;
  b: number | null;
  /** b − a, null when either is. */
  change: number | null;
  ci95: [number, number] | null;
  /** The interval excludes zero. */
  clear: boolean;
}

export interface BandChange {
  min_kmh: number;
  max_kmh: number;
  balance_front_pct: Change;
  understeer_gradient_deg_per_g: Change;
}

export interface SessionComparison {
  cla_front_m2: Change;
  cla_rear_m2: Change;
  balance_front_pct: Change;
  /** Bands present in both sessions with the same edges, in speed order. */
  bands: BandChange[];
  notes: string[];
}

const round = (v: number, digits: number) => Math.round(v * 10 ** digits) / 10 ** digits;

function change(a: number | null, aCi: [number, number] | null, b: number | null, bCi: [number, number] | null, digits: number): Change {
  if (a === null || b === null) return { a, b, change: null, ci95: null, clear: false };
  const d = b - a;
  if (!aCi || !bCi) return { a, b, change: round(d, digits), ci95: null, clear: false };
  const h = Math.hypot((aCi[1] - aCi[0]) / 2, (bCi[1] - bCi[0]) / 2);
  return { a, b, change: round(d, digits), ci95: [round(d - h, digits), round(d + h, digits)], clear: d - h > 0 || d + h < 0 };
}

export function compareSessions(a: SessionSummary, b: SessionSummary): SessionComparison {
  const notes: string[] = [];
  if (a.car.name !== b.car.name) notes.push(`different cars (${a.car.name}, ${b.car.name}): the figures are compared as they are`);
  if (a.aero.model !== b.aero.model && a.aero.model && b.aero.model) notes.push("the two aero fits differ in form (one with static readings, one without): ClA changes include that difference");
  const bands: BandChange[] = [];
  for (const x of a.bands) {
    const y = b.bands.find((c) => c.min_kmh === x.min_kmh && c.max_kmh === x.max_kmh);
    if (!y) continue;
    bands.push({
      min_kmh: x.min_kmh,
      max_kmh: x.max_kmh,
      balance_front_pct: change(x.balance_front_pct, x.balance_front_ci95_pct, y.balance_front_pct, y.balance_front_ci95_pct, 2),
      understeer_gradient_deg_per_g: change(x.understeer_gradient_deg_per_g, x.understeer_ci95_deg_per_g, y.understeer_gradient_deg_per_g, y.understeer_ci95_deg_per_g, 3),
    });
  }
  if (bands.length < Math.max(a.bands.length, b.bands.length)) notes.push("the sessions use different speed bands: only bands with the same edges are compared");
  return {
    cla_front_m2: change(a.aero.cla_front_m2, a.aero.cla_front_ci95_m2, b.aero.cla_front_m2, b.aero.cla_front_ci95_m2, 4),
    cla_rear_m2: change(a.aero.cla_rear_m2, a.aero.cla_rear_ci95_m2, b.aero.cla_rear_m2, b.aero.cla_rear_ci95_m2, 4),
    balance_front_pct: change(a.aero.balance_front_pct, a.aero.balance_front_ci95_pct, b.aero.balance_front_pct, b.aero.balance_front_ci95_pct, 2),
    bands,
    notes,
  };
}

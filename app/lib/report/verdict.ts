/**
 * The one sentence on top of the Balance report, from fixed rules (no free text, no guessing):
 * a change is only called a change when its 95 % interval excludes zero, and the CoP is only placed
 * ahead of or behind the CoG when its interval lies wholly on one side.
 */
import type { SessionSummary } from "~/engine/summary-types";
import { copFromFrontAxleMm } from "~/engine/physics";

export type VerdictSummary = Pick<SessionSummary, "aero" | "bands" | "cop" | "car">;

const kmh = (band: [number, number]) => `${band[0]}–${band[1]} km/h`;
const pts = (v: number) => Math.abs(v).toFixed(1);
const mm = (v: number) => Math.abs(Math.round(v)).toFixed(0);

/** Where an interval lies against zero: "above", "below", or "spans" (includes zero, or missing). */
export function sideOfZero(ci: [number, number] | null): "above" | "below" | "spans" {
  if (!ci) return "spans";
  if (ci[0] > 0) return "above";
  if (ci[1] < 0) return "below";
  return "spans";
}

export interface CopPlacement {
  /** CoP behind the CoG (mm, positive = behind); null without a balance. */
  behindMm: number | null;
  /** The same for the ends of the balance interval (null without one). */
  behindCi95Mm: [number, number] | null;
  side: "behind" | "ahead" | "at";
}

/**
 * CoP against CoG from a balance and its interval: CoP = L·(1 − balance) from the front axle
 * (moment balance about the front axle), so a higher balance puts the CoP further forward.
 */
export function copPlacement(wheelbaseMm: number, cogFromFrontMm: number, balancePct: number | null, ci: [number, number] | null): CopPlacement {
  if (balancePct === null) return { behindMm: null, behindCi95Mm: null, side: "at" };
  const behind = copFromFrontAxleMm(wheelbaseMm, balancePct) - cogFromFrontMm;
  if (!ci) return { behindMm: behind, behindCi95Mm: null, side: "at" };
  // The balance interval's high end is the CoP's forward end.
  const lo = copFromFrontAxleMm(wheelbaseMm, ci[1]) - cogFromFrontMm;
  const hi = copFromFrontAxleMm(wheelbaseMm, ci[0]) - cogFromFrontMm;
  const side = sideOfZero([lo, hi]);
  return { behindMm: behind, behindCi95Mm: [lo, hi], side: side === "above" ? "behind" : side === "below" ? "ahead" : "at" };
}

function copClause(place: CopPlacement, where: string): string {
  if (place.behindMm === null) return "";
  if (place.side === "behind") return `${where} the CoP sits ${mm(place.behindMm)} mm behind the CoG`;
  if (place.side === "ahead") return `${where} the CoP sits ${mm(place.behindMm)} mm ahead of the CoG`;
  if (!place.behindCi95Mm) return `${where} the CoP sits about ${mm(place.behindMm)} mm ${place.behindMm >= 0 ? "behind" : "ahead of"} the CoG (no interval)`;
  const [lo, hi] = place.behindCi95Mm;
  return `${where} the CoP is not clearly ahead of or behind the CoG (${mm(lo)} mm ahead to ${mm(hi)} mm behind)`;
}

/** The verdict sentence. */
export function verdictSentence(s: VerdictSummary): string {
  const { aero } = s;
  if (aero.balance_front_pct === null) return "Not enough fast running to place the aero balance: see the warnings below for what to log next time.";
  const wheelbase = s.car.wheelbase_mm;
  const cog = s.cop.cog_from_front_axle_mm;
  const shift = aero.balance_shift;
  if (!shift) {
    const place = copPlacement(wheelbase, cog, aero.balance_front_pct, aero.balance_front_ci95_pct);
    const cop = copClause(place, "over the stint");
    return `Aero balance ${aero.balance_front_pct.toFixed(1)} % front over the stint; too few speed bands with aero load to say how it moves with speed${cop ? `; ${cop}` : ""}.`;
  }
  const side = sideOfZero(shift.ci95_points);
  let first: string;
  if (side === "spans") {
    first = `No clear change in balance from ${kmh(shift.low_band_kmh)} to ${kmh(shift.high_band_kmh)} (${shift.points >= 0 ? "+" : "−"}${pts(shift.points)} points, interval spans zero)`;
  } else {
    const dir = side === "above" ? "forward" : "rearward";
    first = `Balance moves ${pts(shift.points)} points ${dir} from ${kmh(shift.low_band_kmh)} to ${kmh(shift.high_band_kmh)} (CoP ${mm(shift.cop_shift_mm)} mm ${dir})`;
  }
  const high = s.bands.find((b) => b.min_kmh === shift.high_band_kmh[0] && b.max_kmh === shift.high_band_kmh[1]);
  const place = high ? copPlacement(wheelbase, cog, high.balance_front_pct, high.balance_front_ci95_pct) : null;
  const cop = place ? copClause(place, "at high speed") : "";
  return `${first}${cop ? `; ${cop}` : ""}.`;
}

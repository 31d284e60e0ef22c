/**
 * The `session_bands` rows of one analysed session: one per speed band of the summary, so Compare
 * can query bands across sessions without opening each summary's JSON.
 */
import type { SessionSummary } from "~/engine/summary";
import type { NewSessionBand } from "~/db/schema/sessions";

export function bandRowsOf(sessionId: string, summary: SessionSummary): NewSessionBand[] {
  return summary.bands.map((b) => ({
    sessionId,
    minKmh: b.min_kmh,
    maxKmh: b.max_kmh,
    samples: b.samples,
    aeroSamples: b.aero_samples,
    aeroLoadFrontN: b.aero_load_front_n,
    aeroLoadRearN: b.aero_load_rear_n,
    balanceFrontPct: b.balance_front_pct,
    balanceFrontCi95LoPct: b.balance_front_ci95_pct?.[0] ?? null,
    balanceFrontCi95HiPct: b.balance_front_ci95_pct?.[1] ?? null,
    understeerGradientDegPerG: b.understeer_gradient_deg_per_g,
    understeerCi95LoDegPerG: b.understeer_ci95_deg_per_g?.[0] ?? null,
    understeerCi95HiDegPerG: b.understeer_ci95_deg_per_g?.[1] ?? null,
    understeerSamples: b.understeer_samples,
  }));
}

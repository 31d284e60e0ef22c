/** Balance of several sessions on one chart (Compare's brief): bands lined up by their mid-point. */
import type { SessionSummary } from "~/engine/summary-types";

const mid = (b: { min_kmh: number; max_kmh: number }) => (b.min_kmh + b.max_kmh) / 2;

/** One x per speed band (its mid-point, so sessions with the same bands line up), one balance column per session. */
export function balanceOverlay(sessions: { summary: Pick<SessionSummary, "bands"> }[]) {
  const xs = [...new Set(sessions.flatMap((x) => x.summary.bands.map(mid)))].sort((a, b) => a - b);
  const cols: (number | null)[][] = [xs];
  const intervals: Record<number, ([number, number] | null)[]> = {};
  sessions.forEach((x, i) => {
    const at = xs.map((v) => x.summary.bands.find((b) => mid(b) === v) ?? null);
    cols.push(at.map((b) => b?.balance_front_pct ?? null));
    intervals[i + 1] = at.map((b) => (b && b.balance_front_pct !== null ? b.balance_front_ci95_pct : null));
  });
  return { xs, cols, intervals };
}


/** Sizes, rates and times for the Drop a log page's progress lines. */

export function formatBytes(n: number): string {
  if (n < 1024) return `${n} B`;
  const units = ["KB", "MB", "GB"];
  let v = n / 1024, i = 0;
  while (v >= 1024 && i < units.length - 1) { v /= 1024; i++; }
  return `${v < 10 ? v.toFixed(1) : Math.round(v)} ${units[i]}`;
}

export function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return "—";
  if (seconds < 1) return "under 1 s";
  if (seconds < 60) return `${Math.round(seconds)} s`;
  const m = Math.floor(seconds / 60), s = Math.round(seconds % 60);
  return m < 60 ? `${m} min ${String(s).padStart(2, "0")} s` : `${Math.floor(m / 60)} h ${String(m % 60).padStart(2, "0")} min`;
}

/**
 * Time left from what is done so far at the average rate since the start; null until there is
 * enough to go on (a second, or 1 % of the work).
 */
export function timeLeftS(done: number, total: number, elapsedMs: number): number | null {
  if (done <= 0 || elapsedMs < 1000 || done < total * 0.01) return null;
  return ((total - done) / done) * (elapsedMs / 1000);
}

export function formatRate(bytes: number, elapsedMs: number): string {
  return elapsedMs > 0 ? `${formatBytes((bytes / elapsedMs) * 1000)}/s` : "—";
}

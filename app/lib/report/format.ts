/** Figures as the report shows them: fixed decimals, a real minus sign, "—" for a missing figure. */
export function fmt(v: number | null | undefined, digits: number): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  const text = Math.abs(v).toFixed(digits);
  return v < 0 && Number(text) !== 0 ? `−${text}` : text;
}

/** Signed, for changes: "+2.8", "−1.9". */
export function signed(v: number | null | undefined, digits: number): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  return v > 0 ? `+${fmt(v, digits)}` : fmt(v, digits);
}

/** An interval as "lo … hi" (same decimals), or "no interval". */
export function interval(ci: [number, number] | null | undefined, digits: number): string {
  return ci ? `${fmt(ci[0], digits)} … ${fmt(ci[1], digits)}` : "no interval";
}

export const bandLabel = (b: { min_kmh: number; max_kmh: number }) => `${b.min_kmh}–${b.max_kmh}`;

/**
 * CSV for spreadsheet users: RFC 4180 quoting and CRLF line ends, and text cells that a spreadsheet
 * would run as a formula (starting with = + - @ tab or CR) prefixed with a quote mark, as the OWASP
 * "CSV Injection" guidance advises. Numbers stay numbers (a negative figure is not text).
 * papaparse's unparse does both (its escapeFormulae option).
 */
import Papa from "papaparse";
import type { BandSummary } from "~/engine/summary-types";

export type CsvCell = string | number | null;

export function toCsv(fields: string[], rows: CsvCell[][]): string {
  return Papa.unparse({ fields, data: rows.map((r) => r.map((c) => (c === null || (typeof c === "number" && !Number.isFinite(c)) ? "" : c))) }, { escapeFormulae: true, newline: "\r\n" }) + "\r\n";
}

const lo = (ci: [number, number] | null) => ci?.[0] ?? null;
const hi = (ci: [number, number] | null) => ci?.[1] ?? null;

/** The speed-band table's columns, units in the names. */
export const BAND_CSV_FIELDS = [
  "min_kmh", "max_kmh", "samples", "duration_s", "mean_speed_kmh",
  "aero_load_front_n", "aero_load_rear_n", "cla_front_m2", "cla_front_ci95_lo_m2", "cla_front_ci95_hi_m2",
  "cla_rear_m2", "cla_rear_ci95_lo_m2", "cla_rear_ci95_hi_m2",
  "balance_front_pct", "balance_front_ci95_lo_pct", "balance_front_ci95_hi_pct", "cop_behind_cog_mm",
  "understeer_gradient_deg_per_g", "understeer_ci95_lo_deg_per_g", "understeer_ci95_hi_deg_per_g", "steady_cornering_s",
  "ride_height_change_front_mm", "ride_height_change_rear_mm", "rake_change_mm", "ride_height_front_mm", "ride_height_rear_mm", "rake_mm",
];

export function bandRowsForCsv(bands: BandSummary[]): CsvCell[][] {
  return bands.map((b) => [
    b.min_kmh, b.max_kmh, b.samples, b.duration_s, b.mean_speed_kmh,
    b.aero_load_front_n, b.aero_load_rear_n, b.cla_front_m2, lo(b.cla_front_ci95_m2), hi(b.cla_front_ci95_m2),
    b.cla_rear_m2, lo(b.cla_rear_ci95_m2), hi(b.cla_rear_ci95_m2),
    b.balance_front_pct, lo(b.balance_front_ci95_pct), hi(b.balance_front_ci95_pct), b.cop_behind_cog_mm,
    b.understeer_gradient_deg_per_g, lo(b.understeer_ci95_deg_per_g), hi(b.understeer_ci95_deg_per_g), b.steady_cornering_s,
    b.ride_height_change_front_mm, b.ride_height_change_rear_mm, b.rake_change_mm, b.ride_height_front_mm, b.ride_height_rear_mm, b.rake_mm,
  ]);
}

/** A CSV file name from any label: letters, digits, dots and dashes only. */
export function csvFileName(label: string): string {
  const base = label.normalize("NFKD").replace(/[^A-Za-z0-9.-]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 80);
  return `${base || "rakeline"}.csv`;
}

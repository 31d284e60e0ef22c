import { describe, expect, it } from "vitest";
import Papa from "papaparse";
import { sideViewGeometry } from "~/lib/report/side-view";
import { BAND_CSV_FIELDS, bandRowsForCsv, csvFileName, toCsv } from "~/lib/report/csv";

describe("side-view geometry", () => {
  // 2500 mm drawn in 600 − 2·50 = 500 px → 0.2 px/mm (computed by hand).
  const g = sideViewGeometry({
    wheelbaseMm: 2500,
    cogFromFrontMm: 1500,
    cops: [
      { key: "low", label: "80–120", copFromFrontMm: 1600 },
      { key: "none", label: "0–80", copFromFrontMm: null },
      { key: "high", label: "160–200", copFromFrontMm: 1450 },
      { key: "off", label: "far", copFromFrontMm: 3000 },
    ],
    dimensionKey: "high",
    widthPx: 600,
    padPx: 50,
  });
  it("scales the wheelbase into the drawing and places the axles and the CoG", () => {
    expect(g.scale).toBeCloseTo(0.2, 12);
    expect(g.frontAxleX).toBe(50);
    expect(g.rearAxleX).toBeCloseTo(550, 9);
    expect(g.cogX).toBeCloseTo(350, 9); // 50 + 1500 × 0.2
  });
  it("places each CoP, skips a band without one and pins one off the wheelbase to the edge", () => {
    expect(g.cops.map((c) => c.key)).toEqual(["low", "high", "off"]);
    expect(g.cops[0].x).toBeCloseTo(370, 9); // 50 + 1600 × 0.2
    expect(g.cops[0].behindCogMm).toBe(100);
    expect(g.cops[1].x).toBeCloseTo(340, 9);
    expect(g.cops[2].outside).toBe(true);
    expect(g.cops[2].x).toBeCloseTo(600, 9); // the drawing's right edge
  });
  it("draws the dimension line between the CoG and the chosen CoP with its length in mm", () => {
    expect(g.dimension).toMatchObject({ mm: 50, behind: false, label: "50 mm ahead of CoG" });
    expect(g.dimension!.x1).toBeCloseTo(340, 9);
    expect(g.dimension!.x2).toBeCloseTo(350, 9);
  });
});

// RFC 4180 (quoting, CRLF) and OWASP "CSV Injection" (a leading = + - @ tab or CR in a text cell
// is prefixed with a quote mark so the spreadsheet shows it as text).
describe("CSV", () => {
  it("quotes separators and quote marks, and neutralises formula text but keeps negative numbers", () => {
    const text = toCsv(["label", "value"], [["=HYPERLINK(\"x\")", -1.5], ["+1", null], ["a,b", 2], ["@SUM(A1)", Number.NaN], ["\tcmd", 0]]);
    expect(text.endsWith("\r\n")).toBe(true);
    const parsed = Papa.parse<string[]>(text.trim(), { newline: "\r\n" }).data;
    expect(parsed).toEqual([
      ["label", "value"],
      ["'=HYPERLINK(\"x\")", "-1.5"],
      ["'+1", ""],
      ["a,b", "2"],
      ["'@SUM(A1)", ""],
      ["'\tcmd", "0"],
    ]);
  });
  it("writes one row per band with every column named", () => {
    const rows = bandRowsForCsv([
      {
        min_kmh: 80, max_kmh: 120, samples: 10, aero_samples: 5, mean_dynamic_pressure_pa: 1, aero_load_front_n: 1, aero_load_rear_n: 2, balance_front_pct: 38,
        balance_front_ci95_pct: [37, 39], aero_blocks: 1, cla_front_m2: 0.4, cla_rear_m2: 0.6, understeer_gradient_deg_per_g: -0.2, understeer_ci95_deg_per_g: [-0.3, -0.1],
        understeer_samples: 1, understeer_blocks: 1, understeer_lat_g_range: null, ride_height_change_front_mm: null, ride_height_change_rear_mm: null, rake_change_mm: null,
        ride_height_front_mm: null, ride_height_rear_mm: null, rake_mm: null, duration_s: 1, mean_speed_kmh: 100, cla_front_ci95_m2: null, cla_rear_ci95_m2: null,
        cop_from_front_axle_mm: 1500, cop_behind_cog_mm: 10, steady_cornering_s: 1,
      },
    ]);
    expect(rows[0]).toHaveLength(BAND_CSV_FIELDS.length);
    const parsed = Papa.parse<Record<string, string>>(toCsv(BAND_CSV_FIELDS, rows), { header: true, skipEmptyLines: true }).data;
    expect(parsed[0].balance_front_ci95_lo_pct).toBe("37");
    expect(parsed[0].understeer_gradient_deg_per_g).toBe("-0.2");
    expect(parsed[0].rake_mm).toBe("");
  });
  it("makes a safe file name", () => {
    expect(csvFileName("Kestrel Park / run 3 — bands")).toBe("Kestrel-Park-run-3-bands.csv");
    expect(csvFileName("///")).toBe("rakeline.csv");
  });
});

describe("warnings in plain words", () => {
  it("drops the command-line hints from the engine's messages and groups repeated codes", async () => {
    const { groupWarnings, withoutCliHints } = await import("~/lib/report/warnings");
    expect(withoutCliHints("air density 1.2250 kg/m³ uses ISA sea level (15 °C, 1013.25 hPa); give --air-temp-c and --air-pressure-hpa for the session's weather")).toBe(
      "air density 1.2250 kg/m³ uses ISA sea level (15 °C, 1013.25 hPa)",
    );
    expect(withoutCliHints("fuel not given; give the fuel (--fuel-start-kg, --fuel-end-kg) for firmer band balances")).toBe("fuel not given");
    const groups = groupWarnings([
      { code: "static_load_drift", message: "front changed" },
      { code: "air_density_assumed", message: "ISA" },
      { code: "static_load_drift", message: "rear changed" },
      { code: "something_new", message: "new" },
    ]);
    expect(groups.map((g) => [g.code, g.messages.length])).toEqual([["air_density_assumed", 1], ["static_load_drift", 2], ["something_new", 1]]);
    expect(groups[2].words.title).toBe("Note from the analysis");
  });
});

describe("chart columns", () => {
  it("draws the fitted axle load as ½ρv²·ClA: 1.225 kg/m³, 180 km/h (50 m/s), 0.46 m² → 704.375 N", async () => {
    const { aeroLoadN, rangeWithIntervals } = await import("~/lib/report/chart-data");
    // q = ½ · 1.225 · 50² = 1531.25 Pa (dynamic pressure, any fluids handbook); × 0.46 m² (computed by hand)
    expect(aeroLoadN(1.225, 180, 0.46)).toBeCloseTo(704.375, 9);
    // the range holds the whiskers' ends, padded by 8 % of the span (38 − 36 = 2 → 0.16)
    expect(rangeWithIntervals([37, null], [[36, 38], null])).toEqual([35.84, 38.16]);
    expect(rangeWithIntervals([null], [null])).toBeNull();
  });
});

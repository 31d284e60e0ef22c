/**
 * The engine's warnings in plain words for the Balance report: what it means and what to do about it.
 * The engine's own message (with the figures) is shown beneath; unknown codes fall back to it.
 */
import type { SummaryWarning } from "~/engine/summary-types";

export interface WarningWords {
  title: string;
  todo: string;
  /** Affects figures on the page (shown first) or only explains them. */
  weight: "figures" | "note";
}

const WORDS: Record<string, WarningWords> = {
  few_aero_samples: { title: "Too little fast running for ClA", todo: "Log a stint with more laps at speed; ClA and balance need a spread of speeds.", weight: "figures" },
  aero_fit_failed: { title: "The aero fit did not work", todo: "Check the damper and speed channels in the Channel map (units, signs) and drop the log again.", weight: "figures" },
  few_understeer_samples: { title: "Too little steady cornering in a band", todo: "That band's understeer gradient is missing or rough; longer constant-radius corners in that speed range help.", weight: "figures" },
  one_turn_direction: { title: "Corners in one direction only", todo: "A steering offset cannot be told from understeer; a circuit with left and right corners, or a known steering zero, fixes it.", weight: "figures" },
  steering_offset_from_corners: { title: "Steering zero found from corners", todo: "No straights were steady enough; check the steering zero on the car if gradients look odd.", weight: "note" },
  steering_offset_unknown: { title: "Steering zero unknown", todo: "Understeer gradients are left out; log some straight running or set the steering zero on the logger.", weight: "figures" },
  large_steering_offset: { title: "Large steering offset", todo: "Check the steering sensor's zero and the steering ratio in the Garage.", weight: "figures" },
  band_balance_low_load: { title: "Too little aero load in a band", todo: "Nothing to do: slow bands carry too little aero load to split between the axles.", weight: "note" },
  band_no_aero_samples: { title: "A band has no aero samples", todo: "That band's balance is missing; the car did not run steadily enough at those speeds.", weight: "note" },
  empty_band: { title: "An empty speed band", todo: "The car never ran at those speeds; choose speed bands that match the circuit.", weight: "note" },
  static_estimated: { title: "Static damper readings estimated", todo: "Enter the static damper readings (car on its wheels, driver in) in the Garage for firmer loads.", weight: "figures" },
  no_static_reference: { title: "No static damper readings", todo: "Enter the static damper readings in the Garage; bump-stop and ride-height figures need them.", weight: "figures" },
  no_ride_height_reference: { title: "No ride-height reference", todo: "Enter static ride heights or damper readings in the Garage to place ride height and rake.", weight: "figures" },
  bump_stop_contact: { title: "Bump stops in contact", todo: "The loads lean on the bump-stop gap and rate in the Garage: check both are right for this setup.", weight: "figures" },
  static_load_drift: { title: "Static load changed over the stint", todo: "Fuel burn or damper drift; it is modelled. Enter fuel at start and end to make it firm.", weight: "note" },
  fuel_not_given: { title: "Fuel not given", todo: "Enter the fuel at the start and end of the stint in the session details for firmer band balances.", weight: "figures" },
  fuel_tank_position_assumed: { title: "Fuel tank position assumed", todo: "Enter the fuel tank position in the Garage car page.", weight: "note" },
  air_density_assumed: { title: "Air density assumed", todo: "Enter the air temperature and pressure for the session; ClA scales with the density used.", weight: "figures" },
  dropouts: { title: "Many empty cells", todo: "Check the logger's channels and wiring; the samples with gaps are left out.", weight: "note" },
  unreadable_cells: { title: "Cells that are not numbers", todo: "Those cells were left out; check the export settings of the logger software.", weight: "note" },
  short_rows: { title: "Rows with missing cells", todo: "Those rows were left out (their values could not be placed in the right columns); check the export, or whether the file was cut short.", weight: "note" },
};

export function warningWords(w: SummaryWarning): WarningWords {
  return WORDS[w.code] ?? { title: "Note from the analysis", todo: "Read the message below.", weight: "note" };
}

/** Plain words for the engine's quality flags (how the figures were made). */
const FLAGS: Record<string, string> = {
  ride_height_from_dampers_only: "Ride height and rake come from the dampers only (no ride-height sensors); tyre deflection is left out.",
  curvature_from_yaw_rate: "Corner radius from the yaw-rate channel.",
  bump_stops_modelled: "Bump stops are part of the load model.",
  static_load_drift_modelled: "A change of static load over the stint (fuel, drift) is modelled.",
  static_from_fit_intercept: "Static loads come from the fit (no static damper readings in the car file).",
};

export function flagWords(flag: string): string {
  return FLAGS[flag] ?? flag.replaceAll("_", " ");
}

/**
 * The engine's message without its command-line hints ("give --air-temp-c …"): on a page the
 * plain-words line says where to enter the value instead.
 */
export function withoutCliHints(message: string): string {
  return message
    .split(/;\s+/)
    .filter((part) => !/(^|\s)--[a-z]/.test(part))
    .join("; ")
    .replace(/\s*\((?:[^()]*\s)?--[a-z][^()]*\)/g, "")
    .trim();
}

/** Warnings of the same code become one item holding each message. */
export function groupWarnings(warnings: SummaryWarning[]): { code: string; words: WarningWords; messages: string[] }[] {
  const groups = new Map<string, { code: string; words: WarningWords; messages: string[] }>();
  for (const w of warnings) {
    const g = groups.get(w.code) ?? { code: w.code, words: warningWords(w), messages: [] };
    g.messages.push(withoutCliHints(w.message));
    groups.set(w.code, g);
  }
  return [...groups.values()].sort((x, y) => (x.words.weight === y.words.weight ? 0 : x.words.weight === "figures" ? -1 : 1));
}

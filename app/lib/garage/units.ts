/**
 * Units for the Garage. Storage is SI-style as the engine reads it: mm, kg, N/mm, N, L, deg.
 * "metric" input equals the stored unit (factor 1, so metric values are stored bit-for-bit);
 * "imperial" input is converted with the NIST SP 811 (2008) factors below.
 */

export type UnitSystem = "metric" | "imperial";
export const UNIT_SYSTEMS: readonly UnitSystem[] = ["metric", "imperial"];

/** Kinds of physical quantity a Garage field holds. */
export type Quantity = "length" | "mass" | "springRate" | "force" | "volume" | "angle" | "ratio" | "density";

/** NIST SP 811 Appendix B: 1 in = 25.4 mm (exact). */
export const MM_PER_IN = 25.4;
/** NIST SP 811 Appendix B: 1 lb (avoirdupois) = 0.45359237 kg (exact). */
export const KG_PER_LB = 0.45359237;
/** NIST SP 811 Appendix B: 1 lbf = 4.4482216152605 N. */
export const N_PER_LBF = 4.4482216152605;
/** lbf/in → N/mm = N_PER_LBF / MM_PER_IN (NIST SP 811 lists lbf/in → N/m 175.12683524648). */
export const N_PER_MM_PER_LBF_PER_IN = N_PER_LBF / MM_PER_IN;
/** NIST SP 811 Appendix B: 1 gal (U.S.) = 3.785411784 L (exact). */
export const L_PER_US_GAL = 3.785411784;

const FACTOR_TO_STORED: Record<Quantity, Record<UnitSystem, number>> = {
  length: { metric: 1, imperial: MM_PER_IN },
  mass: { metric: 1, imperial: KG_PER_LB },
  springRate: { metric: 1, imperial: N_PER_MM_PER_LBF_PER_IN },
  force: { metric: 1, imperial: N_PER_LBF },
  volume: { metric: 1, imperial: L_PER_US_GAL },
  angle: { metric: 1, imperial: 1 },
  ratio: { metric: 1, imperial: 1 },
  density: { metric: 1, imperial: 1 },
};

const UNIT_LABEL: Record<Quantity, Record<UnitSystem, string>> = {
  length: { metric: "mm", imperial: "in" },
  mass: { metric: "kg", imperial: "lb" },
  springRate: { metric: "N/mm", imperial: "lbf/in" },
  force: { metric: "N", imperial: "lbf" },
  volume: { metric: "L", imperial: "US gal" },
  angle: { metric: "deg", imperial: "deg" },
  ratio: { metric: "", imperial: "" },
  density: { metric: "kg/L", imperial: "kg/L" },
};

/** Significant digits used when a stored value is shown in an input box of the other system. */
const INPUT_SIGNIFICANT_DIGITS = 6;

export function unitLabel(quantity: Quantity, system: UnitSystem): string {
  return UNIT_LABEL[quantity][system];
}

/** Converts a value typed in `system` to the stored unit. */
export function toStored(value: number, quantity: Quantity, system: UnitSystem): number {
  const factor = FACTOR_TO_STORED[quantity][system];
  return factor === 1 ? value : value * factor;
}

/** Converts a stored value to `system` for display. */
export function fromStored(value: number, quantity: Quantity, system: UnitSystem): number {
  const factor = FACTOR_TO_STORED[quantity][system];
  return factor === 1 ? value : value / factor;
}

export function isUnitSystem(value: unknown): value is UnitSystem {
  return value === "metric" || value === "imperial";
}

/** Marks typed text that is not a number (distinct from an empty field). */
export const NOT_A_NUMBER = Symbol("not-a-number");

/**
 * Parses what a person typed: trims, accepts a decimal comma when no dot is present
 * ("0,745"), rejects anything else that is not a plain number. Empty → undefined.
 */
export function parseTypedNumber(raw: unknown): number | undefined | typeof NOT_A_NUMBER {
  if (raw === undefined || raw === null) return undefined;
  if (typeof raw === "number") return Number.isFinite(raw) ? raw : NOT_A_NUMBER;
  if (typeof raw !== "string") return NOT_A_NUMBER;
  let text = raw.trim();
  if (text === "") return undefined;
  if (!text.includes(".") && /^[-+]?\d+,\d+$/.test(text)) text = text.replace(",", ".");
  if (!/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(text)) return NOT_A_NUMBER;
  const value = Number(text);
  return Number.isFinite(value) ? value : NOT_A_NUMBER;
}

/** A stored value written into an input box of `system` (trailing zeros trimmed). */
export function formatForInput(stored: number | null | undefined, quantity: Quantity, system: UnitSystem): string {
  if (stored === null || stored === undefined || !Number.isFinite(stored)) return "";
  const shown = fromStored(stored, quantity, system);
  if (FACTOR_TO_STORED[quantity][system] === 1) return String(shown);
  return String(Number(shown.toPrecision(INPUT_SIGNIFICANT_DIGITS)));
}

/** A stored value for reading, with its unit: "2450 mm", "96.46 in". */
export function formatQuantity(
  stored: number | null | undefined,
  quantity: Quantity,
  system: UnitSystem,
  decimals = 1,
): string {
  if (stored === null || stored === undefined || !Number.isFinite(stored)) return "—";
  const shown = fromStored(stored, quantity, system);
  const unit = unitLabel(quantity, system);
  const text = shown.toFixed(decimals);
  return unit ? `${text} ${unit}` : text;
}

/** A value already in stored units (kept from the database), passed through the form schema unconverted. */
export class StoredValue {
  constructor(readonly value: number) {}
}

/**
 * When a form is re-submitted, a field whose text still equals what the form showed for the
 * stored value keeps the stored value exactly (no drift from imperial rounding).
 */
export function keepIfUnchanged(
  typed: unknown,
  stored: number | null | undefined,
  quantity: Quantity,
  system: UnitSystem,
): unknown {
  if (stored === null || stored === undefined || typeof typed !== "string") return typed;
  return typed.trim() === formatForInput(stored, quantity, system) ? new StoredValue(stored) : typed;
}

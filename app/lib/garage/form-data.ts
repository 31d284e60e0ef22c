/** Turning posted form data into schema input; shared by every Garage action. */
import type { FieldSpec } from "./fields";
import { StoredValue, formatForInput, isUnitSystem, keepIfUnchanged, type UnitSystem } from "./units";

export function formFields(formData: FormData): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [key, value] of formData) if (typeof value === "string") out[key] = value;
  return out;
}

export function unitSystemOf(value: unknown): UnitSystem {
  return isUnitSystem(value) ? value : "metric";
}

/**
 * For an edit: a number field whose text equals what the form showed for the stored value keeps
 * the stored value exactly, so re-saving in inches does not move a value by a rounding step.
 */
export function keepUnchangedNumbers(
  fields: Record<string, unknown>,
  specs: Record<string, FieldSpec>,
  stored: Record<string, unknown>,
  system: UnitSystem,
): Record<string, unknown> {
  const out: Record<string, unknown> = { ...fields };
  for (const [key, spec] of Object.entries(specs)) {
    if (spec.kind !== "number") continue;
    const previous = stored[key];
    if (typeof previous === "number") out[key] = keepIfUnchanged(fields[key], previous, spec.quantity, system);
  }
  return out;
}

/**
 * The unit switch converts typed numbers and posts the exact value behind each as
 * `exact.<field>`. While the visible text still equals the conversion of that value, the exact value
 * is used, so typing 2450 mm and switching to inches and back stores 2450, not 2450.00018.
 * (The exact value is range-checked like any other; it can only be what the form showed.)
 */
export function applyExactNumbers(fields: Record<string, unknown>, specs: Record<string, FieldSpec>, system: UnitSystem): Record<string, unknown> {
  const out = { ...fields };
  for (const [key, spec] of Object.entries(specs)) {
    if (spec.kind !== "number") continue;
    const exact = Number(fields[`exact.${key}`]);
    const typed = fields[key];
    if (typeof typed !== "string" || fields[`exact.${key}`] === undefined || !Number.isFinite(exact)) continue;
    if (typed.trim() === formatForInput(exact, spec.quantity, system)) out[key] = new StoredValue(exact);
  }
  return out;
}

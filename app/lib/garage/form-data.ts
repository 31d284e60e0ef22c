/** Turning posted form data into schema input; shared by every Garage action. */
import type { FieldSpec } from "./fields";
import { isUnitSystem, keepIfUnchanged, type UnitSystem } from "./units";

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
  fields: Record<string, string>,
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

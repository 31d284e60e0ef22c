/**
 * Field definitions for the Garage forms: label, quantity, plausible range (in stored units) and
 * the messages a person sees. One list drives the zod schemas (server and client), the form
 * inputs, the diff and the tables, so a field's unit and range are written once.
 */
import { fromStored, unitLabel, type Quantity, type UnitSystem } from "./units";

export interface NumberFieldSpec {
  kind: "number";
  label: string;
  quantity: Quantity;
  /** Plausible range in stored units (mm, kg, N/mm, N, L, deg). */
  min: number;
  max: number;
  required?: boolean;
  /** Shown beside the input. */
  hint?: string;
  /** Unit text for a dimensionless field ("%", ": 1"); others take theirs from the quantity. */
  displayUnit?: string;
  /** A more helpful message than the generic range one, for known typing errors. */
  explain?: (stored: number, system: UnitSystem) => string | undefined;
}

export interface TextFieldSpec {
  kind: "text";
  label: string;
  maxLength: number;
  required?: boolean;
  hint?: string;
}

export type FieldSpec = NumberFieldSpec | TextFieldSpec;

function trimNumber(value: number, digits = 4): string {
  return String(Number(value.toPrecision(digits)));
}

/** "1016 mm" or "40 in (1016 mm)". */
export function describeValue(stored: number, quantity: Quantity, system: UnitSystem): string {
  const metric = `${trimNumber(stored)}${unitLabel(quantity, "metric") ? " " + unitLabel(quantity, "metric") : ""}`;
  if (system === "metric" || unitLabel(quantity, "imperial") === unitLabel(quantity, "metric")) return metric;
  return `${trimNumber(fromStored(stored, quantity, system))} ${unitLabel(quantity, system)} (${metric})`;
}

/** "1500–3500 mm" or "1500–3500 mm (59.06–137.8 in)". */
export function describeRange(spec: NumberFieldSpec, system: UnitSystem): string {
  const unit = unitLabel(spec.quantity, "metric");
  const metric = `${trimNumber(spec.min)}–${trimNumber(spec.max)}${unit ? " " + unit : ""}`;
  if (system === "metric" || unitLabel(spec.quantity, "imperial") === unit) return metric;
  const lo = trimNumber(fromStored(spec.min, spec.quantity, system));
  const hi = trimNumber(fromStored(spec.max, spec.quantity, system));
  return `${metric} (${lo}–${hi} ${unitLabel(spec.quantity, system)})`;
}

/** The message for a stored value outside its range, or undefined when it is plausible. */
export function rangeProblem(spec: NumberFieldSpec, stored: number, system: UnitSystem): string | undefined {
  if (stored >= spec.min && stored <= spec.max) return undefined;
  return (
    spec.explain?.(stored, system) ??
    `${spec.label} ${describeValue(stored, spec.quantity, system)} is outside the plausible ${describeRange(spec, system)}. Check for a typing error or the wrong unit.`
  );
}

const motionRatio = (axle: string): NumberFieldSpec & { required: true } => ({
  kind: "number",
  label: `${axle} motion ratio`,
  quantity: "ratio",
  min: 0.3,
  max: 1.5,
  required: true,
  hint: "MR = damper travel / wheel travel (installation angle included); wheel rate = spring rate × MR².",
  explain: (mr) => {
    if (mr >= 0.3 && mr <= 1.5) return undefined;
    const inverse = 1 / mr;
    const flip =
      mr > 0 && inverse >= 0.3 && inverse <= 1.5
        ? ` If you measured wheel travel per damper travel, enter its inverse, 1/${trimNumber(mr, 3)} = ${trimNumber(inverse, 3)}.`
        : "";
    return `A motion ratio of ${trimNumber(mr)} looks like a typing error: MR = damper travel / wheel travel, normally 0.4–1.2 (accepted 0.3–1.5).${flip}`;
  },
});

const bumpGap = (axle: string): NumberFieldSpec => ({
  kind: "number",
  label: `${axle} bump-stop gap`,
  quantity: "length",
  min: 0,
  max: 150,
  hint: "Damper travel from the static position to first contact.",
  explain: (gap, system) =>
    gap < 0
      ? `${axle} bump-stop gap ${describeValue(gap, "length", system)} is negative: the gap is the damper travel from static to contact. If the stop already touches at static, enter 0.`
      : undefined,
});

const cornerWeight = (corner: string): NumberFieldSpec => ({
  kind: "number",
  label: `${corner} corner weight`,
  quantity: "mass",
  min: 20,
  max: 1000,
});

const text = <const E extends Partial<TextFieldSpec>>(label: string, maxLength: number, extra?: E): TextFieldSpec & E =>
  ({ kind: "text", label, maxLength, ...extra }) as TextFieldSpec & E;

export const CAR_FIELDS = {
  name: text("Name", 80, { required: true }),
  category: text("Class / category", 60),
  wheelbaseMm: { kind: "number", label: "Wheelbase", quantity: "length", min: 1500, max: 3500, required: true },
  trackFrontMm: { kind: "number", label: "Front track", quantity: "length", min: 1000, max: 2200 },
  trackRearMm: { kind: "number", label: "Rear track", quantity: "length", min: 1000, max: 2200 },
  cogHeightMm: { kind: "number", label: "CoG height", quantity: "length", min: 150, max: 900, required: true },
  steeringRatio: {
    kind: "number",
    label: "Steering ratio",
    quantity: "ratio",
    displayUnit: ": 1",
    min: 5,
    max: 30,
    required: true,
    hint: "Overall: steering-wheel angle / road-wheel angle, measured on turn plates (12 for 12:1).",
  },
  tyreVerticalStiffnessNPerMm: {
    kind: "number",
    label: "Tyre vertical stiffness",
    quantity: "springRate",
    min: 50,
    max: 1500,
    hint: "Optional; used for ride-height estimates.",
  },
  fuelTankFromFrontAxleMm: {
    kind: "number",
    label: "Fuel tank position",
    quantity: "length",
    min: -1000,
    max: 4500,
    hint: "Centre of the tank, behind the front axle.",
  },
  fuelDensityKgPerL: {
    kind: "number",
    label: "Fuel density",
    quantity: "density",
    min: 0.5,
    max: 1.0,
    required: true,
    hint: "0.745 kg/L is a typical petrol value.",
  },
  cornerFlKg: cornerWeight("FL"),
  cornerFrKg: cornerWeight("FR"),
  cornerRlKg: cornerWeight("RL"),
  cornerRrKg: cornerWeight("RR"),
  weighedFuelL: { kind: "number", label: "Fuel on the scales", quantity: "volume", min: 0, max: 250 },
  massKg: {
    kind: "number",
    label: "Total mass",
    quantity: "mass",
    min: 300,
    max: 2500,
    hint: "With corner weights: optional cross-check of the scale total. Without: required.",
  },
  staticFrontWeightPct: {
    kind: "number",
    label: "Static front weight",
    quantity: "ratio",
    displayUnit: "%",
    min: 20,
    max: 80,
    hint: "% of the total on the front axle.",
  },
  notes: text("Notes", 2000),
} satisfies Record<string, FieldSpec>;

export type CarFieldKey = keyof typeof CAR_FIELDS;

export const SETUP_FIELDS = {
  name: text("Setup name", 80, { required: true }),
  frontSpringRateNPerMm: {
    kind: "number",
    label: "Front spring rate",
    quantity: "springRate",
    min: 5,
    max: 1500,
    required: true,
    hint: "At the damper (the spring's own rate).",
  },
  rearSpringRateNPerMm: {
    kind: "number",
    label: "Rear spring rate",
    quantity: "springRate",
    min: 5,
    max: 1500,
    required: true,
    hint: "At the damper (the spring's own rate).",
  },
  frontMotionRatio: motionRatio("Front"),
  rearMotionRatio: motionRatio("Rear"),
  frontBumpStopGapMm: bumpGap("Front"),
  frontBumpStopRateNPerMm: { kind: "number", label: "Front bump-stop rate", quantity: "springRate", min: 1, max: 20000, hint: "At the damper." },
  rearBumpStopGapMm: bumpGap("Rear"),
  rearBumpStopRateNPerMm: { kind: "number", label: "Rear bump-stop rate", quantity: "springRate", min: 1, max: 20000, hint: "At the damper." },
  staticDamperFlMm: { kind: "number", label: "Static damper FL", quantity: "length", min: -500, max: 500 },
  staticDamperFrMm: { kind: "number", label: "Static damper FR", quantity: "length", min: -500, max: 500 },
  staticDamperRlMm: { kind: "number", label: "Static damper RL", quantity: "length", min: -500, max: 500 },
  staticDamperRrMm: { kind: "number", label: "Static damper RR", quantity: "length", min: -500, max: 500 },
  rideHeightFrontMm: { kind: "number", label: "Static ride height front", quantity: "length", min: 0, max: 300 },
  rideHeightRearMm: { kind: "number", label: "Static ride height rear", quantity: "length", min: 0, max: 300 },
  arbFront: text("Front anti-roll bar", 60),
  arbRear: text("Rear anti-roll bar", 60),
  rearWingAngleDeg: { kind: "number", label: "Rear wing angle", quantity: "angle", min: -10, max: 45 },
  rearWingStep: text("Rear wing step / hole", 40),
  frontAero: text("Splitter / dive planes", 120),
  aeroNotes: text("Other aero (as the class allows)", 500),
  notes: text("Notes", 2000),
  changeNote: text("What changed and why", 200),
} satisfies Record<string, FieldSpec>;

export type SetupFieldKey = keyof typeof SETUP_FIELDS;
export const CORNERS = ["Fl", "Fr", "Rl", "Rr"] as const;

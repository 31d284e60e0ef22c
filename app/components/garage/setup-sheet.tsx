import { Figure } from "~/components/ui/panels";
import { SETUP_FIELDS, type FieldSpec, type SetupFieldKey } from "~/lib/garage/fields";
import { showValue } from "~/lib/garage/diff";
import { formatBumpStopTable, linearRateFromTable, type BumpStopPoint } from "~/lib/garage/bump-stop";
import { fromStored, unitLabel, type UnitSystem } from "~/lib/garage/units";
import type { BumpStopKind } from "~/lib/garage/schemas";

type SetupShown = { [K in SetupFieldKey]?: number | string | null } & {
  frontBumpStopKind: BumpStopKind;
  rearBumpStopKind: BumpStopKind;
  frontBumpStopTable: BumpStopPoint[] | null;
  rearBumpStopTable: BumpStopPoint[] | null;
};

function Row({ k, setup, units }: { k: SetupFieldKey; setup: SetupShown; units: UnitSystem }) {
  const spec = SETUP_FIELDS[k] as FieldSpec;
  const value = setup[k] ?? null;
  return (
    <Figure label={spec.label}>
      {showValue(spec, value, units)}
      {value !== null && spec.kind === "number" && unitLabel(spec.quantity, units) ? ` ${unitLabel(spec.quantity, units)}` : ""}
    </Figure>
  );
}

/** One setup version laid out per axle, values with units. */
export function SetupSheet({ setup, units }: { setup: SetupShown; units: UnitSystem }) {
  const axle = (a: "front" | "rear") => {
    const spring = setup[`${a}SpringRateNPerMm`] as number;
    const mr = setup[`${a}MotionRatio`] as number;
    const kind = setup[`${a}BumpStopKind`];
    const table = setup[`${a}BumpStopTable`];
    return (
      <section className={`border-l-4 pl-3 ${a === "front" ? "border-front" : "border-rear"}`}>
        <h3 className="mb-1 font-semibold">{a === "front" ? "Front" : "Rear"}</h3>
        <dl className="grid grid-cols-[1fr_auto] gap-x-4 text-sm">
          <Row k={`${a}SpringRateNPerMm`} setup={setup} units={units} />
          <Row k={`${a}MotionRatio`} setup={setup} units={units} />
          <Figure label="Wheel rate (spring × MR²)">
            {fromStored(spring * mr * mr, "springRate", units).toFixed(1)} {unitLabel("springRate", units)}
          </Figure>
          {kind === "none" ? (
            <Figure label="Bump stop" valueClass="text-right">none</Figure>
          ) : (
            <>
              <Row k={`${a}BumpStopGapMm`} setup={setup} units={units} />
              {kind === "linear" && <Row k={`${a}BumpStopRateNPerMm`} setup={setup} units={units} />}
              {kind === "table" && table && (
                <Figure label={`Bump-stop table (${units === "metric" ? "mm N" : "in lbf"})`} valueClass="num whitespace-pre text-right">
                  {formatBumpStopTable(table, units)}
                  {"\n"}fit: {fromStored(linearRateFromTable(table), "springRate", units).toFixed(0)} {unitLabel("springRate", units)}
                </Figure>
              )}
            </>
          )}
          <Row k={a === "front" ? "arbFront" : "arbRear"} setup={setup} units={units} />
          <Row k={a === "front" ? "rideHeightFrontMm" : "rideHeightRearMm"} setup={setup} units={units} />
        </dl>
      </section>
    );
  };
  return (
    <div className="space-y-4">
      <div className="grid gap-6 md:grid-cols-2">
        {axle("front")}
        {axle("rear")}
      </div>
      <div className="grid gap-6 md:grid-cols-2">
        <dl className="grid grid-cols-[1fr_auto] gap-x-4 text-sm">
          {(["staticDamperFlMm", "staticDamperFrMm", "staticDamperRlMm", "staticDamperRrMm"] as const).map((k) => (
            <Row key={k} k={k} setup={setup} units={units} />
          ))}
        </dl>
        <dl className="grid grid-cols-[1fr_auto] gap-x-4 text-sm">
          {(["rearWingAngleDeg", "rearWingStep", "frontAero", "aeroNotes"] as const).map((k) => (
            <Row key={k} k={k} setup={setup} units={units} />
          ))}
        </dl>
      </div>
      {setup.notes && <p className="whitespace-pre-line text-sm">{setup.notes}</p>}
      <p className="text-xs text-ink-faint">Rates at the damper · MR = damper travel / wheel travel · bump-stop gap from static.</p>
    </div>
  );
}

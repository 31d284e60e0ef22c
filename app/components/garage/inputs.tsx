import type { ReactNode } from "react";
import type { NumberFieldSpec, TextFieldSpec } from "~/lib/garage/fields";
import { unitLabel, UNIT_SYSTEMS, type UnitSystem } from "~/lib/garage/units";

const inputLook = (error?: string) =>
  `block w-full rounded border bg-panel px-2.5 py-1.5 text-ink outline-none focus:border-accent focus:ring-2 focus:ring-accent/25 ${error ? "border-danger" : "border-rule"}`;

function Message({ id, error, hint }: { id: string; error?: string; hint?: ReactNode }) {
  if (error)
    return (
      <p id={id} className="mt-1 text-sm text-danger" role="alert">
        {error}
      </p>
    );
  if (hint) return <p id={id} className="mt-1 text-xs text-ink-faint">{hint}</p>;
  return null;
}

/** A number with its unit beside it; `data-quantity` lets the unit switch convert what is typed. */
/** A field's label, marked "(optional)" when the field is not required. */
function FieldLabel({ id, spec }: { id: string; spec: NumberFieldSpec | TextFieldSpec }) {
  return (
    <label htmlFor={id} className="mb-1 block text-sm font-medium">
      {spec.label}
      {spec.required ? "" : <span className="font-normal text-ink-faint"> (optional)</span>}
    </label>
  );
}

export function NumberInput({ name, spec, system, defaultValue, error, hint, className }: {
  name: string;
  spec: NumberFieldSpec;
  system: UnitSystem;
  defaultValue?: string;
  error?: string;
  hint?: ReactNode;
  className?: string;
}) {
  const id = `f-${name}`;
  const unit = spec.displayUnit ?? unitLabel(spec.quantity, system);
  return (
    <div className={className ?? "mb-3"}>
      <FieldLabel id={id} spec={spec} />
      <div className="flex items-center gap-2">
        <input
          id={id}
          name={name}
          inputMode="decimal"
          autoComplete="off"
          defaultValue={defaultValue}
          data-quantity={spec.quantity}
          aria-invalid={error ? true : undefined}
          aria-describedby={`${id}-msg`}
          className={`num text-right ${inputLook(error)}`}
        />
        <span className="num w-14 shrink-0 text-sm text-ink-soft">{unit}</span>
      </div>
      <Message id={`${id}-msg`} error={error} hint={hint ?? spec.hint} />
    </div>
  );
}

export function TextInput({ name, spec, defaultValue, error, multiline, className }: {
  name: string;
  spec: TextFieldSpec;
  defaultValue?: string | null;
  error?: string;
  multiline?: boolean;
  className?: string;
}) {
  const id = `f-${name}`;
  const common = {
    id,
    name,
    defaultValue: defaultValue ?? "",
    maxLength: spec.maxLength,
    "aria-invalid": error ? true : undefined,
    "aria-describedby": `${id}-msg`,
    className: inputLook(error),
  };
  return (
    <div className={className ?? "mb-3"}>
      <FieldLabel id={id} spec={spec} />
      {multiline ? <textarea rows={3} {...common} /> : <input {...common} />}
      <Message id={`${id}-msg`} error={error} hint={spec.hint} />
    </div>
  );
}

/** Metric / imperial switch for a form; the chosen system travels with the form as `units`. */
export function UnitSwitch({ system, onChange }: { system: UnitSystem; onChange: (s: UnitSystem) => void }) {
  return (
    <fieldset className="flex items-center gap-3 text-sm">
      <legend className="sr-only">Units for input</legend>
      <span className="text-ink-soft">Enter values in</span>
      {UNIT_SYSTEMS.map((s) => (
        <label key={s} className={`cursor-pointer rounded border px-2 py-1 ${system === s ? "border-accent bg-accent text-white" : "border-rule bg-panel"}`}>
          <input type="radio" className="sr-only" checked={system === s} onChange={() => onChange(s)} />
          {s === "metric" ? "mm · kg · N/mm" : "in · lb · lbf/in"}
        </label>
      ))}
      <input type="hidden" name="units" value={system} />
      <span className="text-xs text-ink-faint">Stored as mm, kg, N/mm (NIST SP 811 factors).</span>
    </fieldset>
  );
}

export function DraftNotice({ savedAt, onDiscard }: { savedAt: string | null; onDiscard: () => void }) {
  if (!savedAt) return null;
  return (
    <p role="status" className="mb-3 flex items-center gap-3 rounded border border-rule bg-rule-soft px-3 py-1.5 text-xs text-ink-soft">
      Draft kept in this browser (last change {new Date(savedAt).toLocaleTimeString()}).
      <button type="button" onClick={onDiscard} className="text-accent underline">
        Discard draft
      </button>
    </p>
  );
}

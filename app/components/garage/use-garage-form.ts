/**
 * Client side of a Garage form: field-level validation with the same zod schema the action uses,
 * a unit switch that converts what is typed, and a draft in localStorage (keyed by form) that
 * survives a reload until the form is saved or the draft discarded.
 */
import { useCallback, useEffect, useRef, useState, type FormEvent } from "react";
import type { z } from "zod";
import { fieldErrors } from "~/lib/garage/schemas";
import { formatForInput, parseTypedNumber, NOT_A_NUMBER, toStored, type Quantity, type UnitSystem } from "~/lib/garage/units";

type SchemaFactory = (system: UnitSystem) => z.ZodType;
const DRAFT_PREFIX = "rakeline:draft:";
const EXACT_PREFIX = "exact.";

/** A hidden `exact.<field>` input holding the stored value behind a converted number. */
function setExact(form: HTMLFormElement, field: string, stored: string, shown?: string) {
  let input = form.elements.namedItem(EXACT_PREFIX + field) as HTMLInputElement | null;
  if (!input) {
    input = document.createElement("input");
    input.type = "hidden";
    input.name = EXACT_PREFIX + field;
    form.appendChild(input);
  }
  input.value = stored;
  if (shown !== undefined) input.dataset.shown = shown;
  else {
    const visible = form.elements.namedItem(field);
    if (visible instanceof HTMLInputElement) input.dataset.shown = visible.value;
  }
}

function readForm(form: HTMLFormElement): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [key, value] of new FormData(form)) if (typeof value === "string") out[key] = value;
  return out;
}

export function useGarageForm(options: {
  draftKey: string;
  schema: SchemaFactory;
  initialSystem: UnitSystem;
  serverErrors?: Record<string, string>;
}) {
  const formRef = useRef<HTMLFormElement>(null);
  const [system, setSystemState] = useState<UnitSystem>(options.initialSystem);
  const [values, setValues] = useState<Record<string, string>>({});
  const [touched, setTouched] = useState<Set<string>>(new Set());
  const [clientErrors, setClientErrors] = useState<Record<string, string>>({});
  const [draftSavedAt, setDraftSavedAt] = useState<string | null>(null);
  const storageKey = DRAFT_PREFIX + options.draftKey;

  const validate = useCallback(
    (form: HTMLFormElement, sys: UnitSystem) => {
      const result = options.schema(sys).safeParse(readForm(form));
      return result.success ? {} : fieldErrors(result.error);
    },
    [options.schema],
  );

  // Restore a draft once, after hydration.
  useEffect(() => {
    const form = formRef.current;
    if (!form) return;
    try {
      const raw = window.localStorage.getItem(storageKey);
      if (raw) {
        const draft = JSON.parse(raw) as { savedAt: string; system: UnitSystem; values: Record<string, string> };
        for (const [name, value] of Object.entries(draft.values)) {
          if (name.startsWith(EXACT_PREFIX)) setExact(form, name.slice(EXACT_PREFIX.length), value);
          const el = form.elements.namedItem(name);
          if (el instanceof HTMLInputElement && el.type === "checkbox") el.checked = value === "on";
          else if (el instanceof HTMLInputElement || el instanceof HTMLTextAreaElement || el instanceof HTMLSelectElement) el.value = value;
        }
        setSystemState(draft.system);
        setDraftSavedAt(draft.savedAt);
      }
    } catch {
      window.localStorage.removeItem(storageKey);
    }
    setValues(readForm(form));
  }, [storageKey]);

  const saveDraft = useCallback(
    (form: HTMLFormElement, sys: UnitSystem) => {
      const savedAt = new Date().toISOString();
      window.localStorage.setItem(storageKey, JSON.stringify({ savedAt, system: sys, values: readForm(form) }));
      setDraftSavedAt(savedAt);
    },
    [storageKey],
  );

  // A form the server refused comes back with its values still in the inputs: keep them as the draft again.
  useEffect(() => {
    if (formRef.current && options.serverErrors && Object.keys(options.serverErrors).length) saveDraft(formRef.current, system);
    // eslint-disable-next-line react-hooks/exhaustive-deps -- only when a new answer arrives
  }, [options.serverErrors]);

  const onInput = (event: FormEvent<HTMLFormElement>) => {
    const form = event.currentTarget;
    setValues(readForm(form));
    saveDraft(form, system);
    const name = (event.target as HTMLInputElement).name;
    if (name && touched.has(name)) setClientErrors(validate(form, system));
  };

  const onBlur = (event: FormEvent<HTMLFormElement>) => {
    const name = (event.target as HTMLInputElement).name;
    if (!name) return;
    setTouched((t) => new Set(t).add(name));
    setClientErrors(validate(event.currentTarget, system));
  };

  const onSubmit = (event: FormEvent<HTMLFormElement>) => {
    const errors = validate(event.currentTarget, system);
    if (Object.keys(errors).length) {
      event.preventDefault();
      setTouched(new Set(Object.keys(errors)));
      setClientErrors(errors);
      const first = event.currentTarget.elements.namedItem(Object.keys(errors)[0]);
      if (first instanceof HTMLElement) first.focus();
      return;
    }
    // The action answers with a redirect on success; a refused form returns and keeps the draft.
    window.localStorage.removeItem(storageKey);
  };

  /** Switch units, converting every number already typed (inputs carry data-quantity). */
  const setSystem = (next: UnitSystem) => {
    const form = formRef.current;
    if (!form || next === system) return;
    for (const el of Array.from(form.querySelectorAll<HTMLInputElement>("input[data-quantity]"))) {
      const typed = parseTypedNumber(el.value);
      if (typed === undefined || typed === NOT_A_NUMBER) continue;
      const quantity = el.dataset.quantity as Quantity;
      // The exact stored value rides along, so switching units does not move a value by rounding.
      const exact = form.elements.namedItem(EXACT_PREFIX + el.name);
      const previous = exact instanceof HTMLInputElement && el.value.trim() === exact.dataset.shown ? Number(exact.value) : null;
      const stored = previous ?? toStored(typed, quantity, system);
      el.value = formatForInput(stored, quantity, next);
      setExact(form, el.name, String(stored), el.value);
    }
    setSystemState(next);
    setValues(readForm(form));
    saveDraft(form, next);
    setClientErrors(validate(form, next));
  };

  const discardDraft = () => {
    window.localStorage.removeItem(storageKey);
    window.location.reload();
  };

  const visibleClient = Object.fromEntries(Object.entries(clientErrors).filter(([k]) => touched.has(k)));
  const errors = { ...(options.serverErrors ?? {}), ...visibleClient };
  // A field the person fixed since the server answered loses the server's message.
  for (const key of Object.keys(options.serverErrors ?? {})) if (touched.has(key) && !clientErrors[key]) delete errors[key];

  return { formRef, system, setSystem, values, errors, onInput, onBlur, onSubmit, draftSavedAt, discardDraft };
}

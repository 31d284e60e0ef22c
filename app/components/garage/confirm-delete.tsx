import { Form } from "react-router";

/**
 * A delete behind a confirmation: the form opens from a "Delete…" summary, says what will happen and needs a
 * ticked box (the server checks it too), so one stray click deletes nothing.
 */
export function ConfirmDelete({ label, intent, consequence, fields = {} }: {
  label: string;
  intent: string;
  consequence: string;
  fields?: Record<string, string>;
}) {
  const id = `confirm-${intent}`;
  return (
    <details className="relative basis-full sm:basis-auto">
      <summary className="cursor-pointer list-none rounded border border-rule bg-panel px-3 py-1.5 text-danger hover:bg-danger-bg">{label}…</summary>
      <Form method="post" className="z-10 mt-1 w-full min-w-64 space-y-2 rounded border border-rule bg-panel p-3 text-sm shadow sm:absolute sm:right-0 sm:w-72">
        <p>{consequence}</p>
        {Object.entries(fields).map(([name, value]) => (
          <input key={name} type="hidden" name={name} value={value} />
        ))}
        <label htmlFor={id} className="flex items-start gap-2">
          <input id={id} type="checkbox" name="confirm" value="yes" required className="mt-1" />
          <span>Yes, {label.toLowerCase()}</span>
        </label>
        <button name="intent" value={intent} className="rounded border border-danger bg-panel px-3 py-1.5 font-medium text-danger hover:bg-danger-bg">
          {label}
        </button>
      </Form>
    </details>
  );
}

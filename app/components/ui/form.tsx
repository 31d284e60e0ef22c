import type { InputHTMLAttributes, ReactNode } from "react";

// Form pieces: a labelled field with its message, one primary button style, a form-level alert.
type FieldProps = InputHTMLAttributes<HTMLInputElement> & { label: string; name: string; error?: string; hint?: ReactNode };

export function Field({ label, name, error, hint, id, className, ...input }: FieldProps) {
  const inputId = id ?? `f-${name}`;
  const messageId = `${inputId}-msg`;
  return (
    <div className={className ?? "mb-4"}>
      <label htmlFor={inputId} className="mb-1 block text-sm font-medium text-ink">
        {label}
      </label>
      <input
        id={inputId}
        name={name}
        aria-invalid={error ? true : undefined}
        aria-describedby={error || hint ? messageId : undefined}
        className={`block w-full rounded border bg-panel px-3 py-2 text-ink outline-none focus:border-accent focus:ring-2 focus:ring-accent/25 ${error ? "border-danger" : "border-rule"}`}
        {...input}
      />
      {error ? (
        <p id={messageId} className="mt-1 text-sm text-danger" role="alert">
          {error}
        </p>
      ) : hint ? (
        <p id={messageId} className="mt-1 text-sm text-ink-faint">
          {hint}
        </p>
      ) : null}
    </div>
  );
}

export function SelectField({ label, name, error, options, defaultValue, className }: {
  label: string;
  name: string;
  error?: string;
  options: ReadonlyArray<{ value: string; label: string }>;
  defaultValue?: string;
  className?: string;
}) {
  return (
    <div className={className ?? "mb-4"}>
      <label htmlFor={`f-${name}`} className="mb-1 block text-sm font-medium text-ink">
        {label}
      </label>
      <select
        id={`f-${name}`}
        name={name}
        defaultValue={defaultValue}
        className={`block w-full rounded border bg-panel px-3 py-2 text-ink ${error ? "border-danger" : "border-rule"}`}
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      {error && <p className="mt-1 text-sm text-danger" role="alert">{error}</p>}
    </div>
  );
}

type ButtonProps = { children: ReactNode; busy?: boolean; variant?: "primary" | "quiet" | "danger"; name?: string; value?: string; className?: string };

export function Button({ children, busy, variant = "primary", name, value, className }: ButtonProps) {
  const look = {
    primary: "bg-accent text-white hover:bg-accent-strong border-accent",
    quiet: "bg-panel text-ink hover:bg-rule-soft border-rule",
    danger: "bg-panel text-danger hover:bg-danger-bg border-rule",
  }[variant];
  return (
    <button
      type="submit"
      name={name}
      value={value}
      disabled={busy}
      className={`inline-flex items-center justify-center rounded border px-3 py-2 text-sm font-medium disabled:opacity-60 ${look} ${className ?? ""}`}
    >
      {busy ? "Working…" : children}
    </button>
  );
}

export function FormAlert({ children, tone = "danger" }: { children: ReactNode; tone?: "danger" | "info" }) {
  if (!children) return null;
  const look = tone === "danger" ? "border-danger/40 bg-danger-bg text-danger" : "border-rule bg-rule-soft text-ink";
  return (
    <div role={tone === "danger" ? "alert" : "status"} className={`mb-4 rounded border px-3 py-2 text-sm ${look}`}>
      {children}
    </div>
  );
}

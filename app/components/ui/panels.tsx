import type { ReactNode } from "react";
import { Link } from "react-router";
import { Wordmark } from "./wordmark";

export function Panel({ title, children, actions }: { title?: ReactNode; children: ReactNode; actions?: ReactNode }) {
  return (
    <section className="rounded border border-rule bg-panel">
      {(title || actions) && (
        <header className="flex items-center justify-between gap-3 border-b border-rule-soft px-4 py-2.5">
          {title && <h2 className="text-base font-semibold">{title}</h2>}
          {actions}
        </header>
      )}
      <div className="px-4 py-3">{children}</div>
    </section>
  );
}

/** One figure of a key/value list (inside a two-column grid `<dl>`): label left, value right-aligned. */
export function Figure({ label, children, valueClass = "num text-right" }: { label: ReactNode; children: ReactNode; valueClass?: string }) {
  return (
    <div className="contents">
      <dt className="text-ink-soft">{label}</dt>
      <dd className={valueClass}>{children}</dd>
    </div>
  );
}

/** A key/value list of figures; `className` sets the grid's look. */
export function FigureList({ rows, className, live }: { rows: [string, ReactNode][]; className: string; live?: boolean }) {
  return (
    <dl aria-live={live ? "polite" : undefined} className={className}>
      {rows.map(([k, v]) => (
        <Figure key={k} label={k}>{v}</Figure>
      ))}
    </dl>
  );
}

/** What an empty page says: what belongs here and the next step to fill it. */
export function EmptyState({ title, children, action }: { title: string; children: ReactNode; action?: { to: string; label: string } }) {
  return (
    <div className="rounded border border-dashed border-rule bg-panel px-5 py-6">
      <h3 className="font-semibold">{title}</h3>
      <div className="mt-1 max-w-prose text-sm text-ink-soft">{children}</div>
      {action && (
        <Link to={action.to} className="mt-3 inline-block rounded border border-accent bg-accent px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-strong">
          {action.label}
        </Link>
      )}
    </div>
  );
}

/** The standing caution wherever numbers could lead to a car being set up wrongly. */
export function Caution({ compact }: { compact?: boolean }) {
  return (
    <aside role="note" className={`rounded border border-caution/30 bg-caution-bg text-caution ${compact ? "px-3 py-2 text-xs" : "px-4 py-3 text-sm"}`}>
      <strong className="font-semibold">Estimates, not safety margins.</strong> Rakeline's figures come from logged data and
      the car details you enter. Follow your series' technical regulations, and have a qualified engineer confirm any
      change before it goes on the car.
    </aside>
  );
}

/** A small centred card for the sign-in family of pages. */
export function AuthCard({ title, children, footer }: { title: string; children: ReactNode; footer?: ReactNode }) {
  return (
    <main id="main" tabIndex={-1} className="mx-auto flex min-h-screen max-w-md flex-col justify-center px-4 py-10">
      <div className="mb-6 text-lg">
        <Wordmark />
      </div>
      <div className="rounded border border-rule bg-panel px-6 py-6">
        <h1 className="mb-4 text-xl font-semibold">{title}</h1>
        {children}
      </div>
      {footer && <div className="mt-4 text-sm text-ink-soft">{footer}</div>}
    </main>
  );
}

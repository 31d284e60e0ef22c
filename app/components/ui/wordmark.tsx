import { Link } from "react-router";

/** Rakeline's mark: a floor line pitched nose-down between the front (orange) and rear (teal) axles. */
export function Wordmark({ to = "/" }: { to?: string }) {
  return (
    <Link to={to} className="inline-flex items-center gap-2 font-semibold tracking-tight text-ink" aria-label="Rakeline home">
      <svg width="28" height="16" viewBox="0 0 28 16" aria-hidden="true">
        <line x1="3" y1="12" x2="25" y2="5" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
        <circle cx="5" cy="12" r="2.6" fill="var(--color-front)" />
        <circle cx="23" cy="5.6" r="2.6" fill="var(--color-rear)" />
      </svg>
      <span>Rakeline</span>
    </Link>
  );
}

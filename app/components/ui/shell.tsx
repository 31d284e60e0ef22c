import { useRef, type KeyboardEvent, type ReactNode } from "react";
import { Form, NavLink } from "react-router";
import { ROLE_LABELS, type Role } from "~/lib/access";
import { teamPath } from "~/lib/team-schemas";
import { Wordmark } from "./wordmark";

export type ShellTeam = { name: string; slug: string; role: Role };
type ShellProps = {
  user: { name: string; email: string };
  teams: ShellTeam[];
  current?: ShellTeam;
  nav?: Array<{ to: string; label: string; end?: boolean }>;
  children: ReactNode;
};

const navLink = ({ isActive }: { isActive: boolean }) =>
  `rounded px-2.5 py-1.5 text-sm ${isActive ? "bg-rule-soft font-semibold text-ink" : "text-ink-soft hover:text-ink"}`;

/** The signed-in frame: mark, team switcher, team navigation, account and sign-out. */
export function AppShell({ user, teams, current, nav, children }: ShellProps) {
  return (
    <div className="min-h-screen">
      <header className="border-b border-rule bg-panel">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-4 gap-y-2 px-4 py-2.5">
          <Wordmark to={current ? teamPath(current.slug) : "/"} />
          <TeamSwitcher teams={teams} current={current} />
          {nav && (
            <nav aria-label="Team" className="flex flex-wrap gap-1">
              {nav.map((n) => (
                <NavLink key={n.to} to={n.to} end={n.end} className={navLink}>
                  {n.label}
                </NavLink>
              ))}
            </nav>
          )}
          <div className="ml-auto flex items-center gap-3 text-sm">
            <NavLink to="/account" className={navLink} title={user.email}>
              {user.name}
            </NavLink>
            <Form method="post" action="/sign-out">
              <button type="submit" className="rounded px-2.5 py-1.5 text-sm text-ink-soft hover:text-ink">
                Sign out
              </button>
            </Form>
          </div>
        </div>
      </header>
      <main id="main" tabIndex={-1} className="mx-auto max-w-6xl px-4 py-6">{children}</main>
    </div>
  );
}

/** A disclosure list of links: works without JavaScript and on a tablet; Escape closes it. */
function TeamSwitcher({ teams, current }: { teams: ShellTeam[]; current?: ShellTeam }) {
  const details = useRef<HTMLDetailsElement>(null);
  if (teams.length === 0) return null;
  const onKeyDown = (event: KeyboardEvent<HTMLDetailsElement>) => {
    if (event.key !== "Escape" || !details.current?.open) return;
    details.current.open = false;
    details.current.querySelector("summary")?.focus();
  };
  return (
    <details className="relative" ref={details} onKeyDown={onKeyDown}>
      <summary className="cursor-pointer list-none rounded border border-rule px-2.5 py-1 text-sm hover:bg-rule-soft">
        <span className="sr-only">Team: </span>
        {current ? current.name : "Choose a team"} <span aria-hidden="true">▾</span>
      </summary>
      <ul className="absolute left-0 z-10 mt-1 min-w-64 rounded border border-rule bg-panel py-1 shadow-sm">
        {teams.map((t) => (
          <li key={t.slug}>
            <a
              href={teamPath(t.slug)}
              aria-current={current?.slug === t.slug ? "page" : undefined}
              className="flex items-baseline justify-between gap-4 px-3 py-1.5 text-sm hover:bg-rule-soft aria-[current=page]:font-semibold"
            >
              <span>{t.name}</span>
              <span className="text-xs text-ink-faint">{ROLE_LABELS[t.role]}</span>
            </a>
          </li>
        ))}
        <li className="mt-1 border-t border-rule-soft">
          <a href="/teams/new" className="block px-3 py-1.5 text-sm text-accent hover:bg-rule-soft">
            + Create a team
          </a>
        </li>
      </ul>
    </details>
  );
}

import { Link, redirect } from "react-router";
import { Caution } from "~/components/ui/panels";
import { Wordmark } from "~/components/ui/wordmark";
import { getSignedIn } from "~/server/session.server";
import { startPathFor } from "~/server/teams.server";
import type { Route } from "./+types/landing";

export async function loader({ request }: Route.LoaderArgs) {
  const signedIn = await getSignedIn(request);
  if (signedIn) throw redirect(await startPathFor(signedIn.user.id));
  return null;
}

const STEPS = [
  { title: "Drop a log", body: "After the stint, drop the data-logger export. Rakeline reads it, checks the channels and keeps it with the car and setup it ran." },
  { title: "Balance report", body: "Aero balance (% front), centre of pressure against centre of gravity, ClA and understeer gradient, per speed band, with the spread of every figure." },
  { title: "Compare", body: "Put stints side by side across the weekend or the season: what a wing click, a spring or a ride-height change really moved." },
  { title: "Driver briefs", body: "Share a read-only brief with the driver: the corners and speed bands that matter, without the raw channels." },
];

export default function Landing() {
  return (
    <div className="min-h-screen">
      <header className="border-b border-rule bg-panel">
        <div className="mx-auto flex max-w-6xl items-center gap-4 px-4 py-3">
          <Wordmark />
          <nav className="ml-auto flex gap-2 text-sm">
            <Link to="/sign-in" className="rounded px-3 py-1.5 text-ink-soft hover:text-ink">Sign in</Link>
            <Link to="/sign-up" className="rounded border border-accent bg-accent px-3 py-1.5 font-medium text-white hover:bg-accent-strong">Create account</Link>
          </nav>
        </div>
      </header>
      <main id="main" tabIndex={-1} className="mx-auto max-w-6xl px-4 py-8">
        <section className="grid gap-8 md:grid-cols-[3fr_2fr] md:items-center">
          <div>
            <h1 className="text-3xl font-semibold leading-tight">Know where the balance went, stint by stint.</h1>
            <p className="mt-3 max-w-prose text-ink-soft">
              Rakeline is for race and data engineers of circuit, hill-climb and time-attack teams. Drop the logger export after
              every run and get the aero balance, the centre of pressure against the centre of gravity and the understeer
              gradient for each speed band — then compare runs and brief the driver.
            </p>
            <div className="mt-5 flex gap-3">
              <Link to="/sign-up" className="rounded border border-accent bg-accent px-4 py-2 font-medium text-white hover:bg-accent-strong">Create your team</Link>
              <Link to="/sign-in" className="rounded border border-rule bg-panel px-4 py-2 font-medium hover:bg-rule-soft">Sign in</Link>
            </div>
          </div>
          <BandSketch />
        </section>
        <ol className="mt-8 grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
          {STEPS.map((s, i) => (
            <li key={s.title} className="rounded border border-rule bg-panel px-4 py-3">
              <span className="num text-xs text-ink-faint">{String(i + 1).padStart(2, "0")}</span>
              <h2 className="font-semibold">{s.title}</h2>
              <p className="mt-1 text-sm text-ink-soft">{s.body}</p>
            </li>
          ))}
        </ol>
        <div className="mt-6">
          <Caution />
        </div>
      </main>
    </div>
  );
}

/** An illustrative (not measured) sketch: balance per speed band with its spread, front axle colour. */
function BandSketch() {
  const bands = [
    { label: "80–120", front: 44.5, spread: 1.6 },
    { label: "120–160", front: 43.2, spread: 1.1 },
    { label: "160–200", front: 41.8, spread: 0.9 },
    { label: "200–240", front: 40.9, spread: 1.3 },
  ];
  const x = (pct: number) => ((pct - 36) / 12) * 220 + 90;
  return (
    <figure className="rounded border border-rule bg-panel p-4" aria-label="Illustration of a balance report">
      <figcaption className="mb-2 text-xs text-ink-faint">Illustration · aero balance, % front, per speed band (km/h)</figcaption>
      <svg viewBox="0 0 330 150" className="w-full">
        {[38, 42, 46].map((p) => (
          <g key={p}>
            <line x1={x(p)} x2={x(p)} y1="8" y2="128" stroke="var(--color-rule)" />
            <text x={x(p)} y="144" textAnchor="middle" className="num" fontSize="10" fill="var(--color-ink-faint)">{p} %</text>
          </g>
        ))}
        {bands.map((b, i) => {
          const y = 22 + i * 30;
          return (
            <g key={b.label}>
              <text x="4" y={y + 4} className="num" fontSize="10" fill="var(--color-ink-soft)">{b.label}</text>
              <line x1={x(b.front - b.spread)} x2={x(b.front + b.spread)} y1={y} y2={y} stroke="var(--color-front)" strokeWidth="2" />
              <line x1={x(b.front - b.spread)} x2={x(b.front - b.spread)} y1={y - 4} y2={y + 4} stroke="var(--color-front)" />
              <line x1={x(b.front + b.spread)} x2={x(b.front + b.spread)} y1={y - 4} y2={y + 4} stroke="var(--color-front)" />
              <circle cx={x(b.front)} cy={y} r="3.5" fill="var(--color-front)" />
            </g>
          );
        })}
      </svg>
    </figure>
  );
}

export const meta: Route.MetaFunction = () => [
  { title: "Rakeline · aero balance and understeer from your logger" },
  { name: "description", content: "Aero balance, centre of pressure vs centre of gravity and understeer gradient per speed band, after every stint." },
];

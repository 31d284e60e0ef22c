import { Link } from "react-router";
import { Caution, EmptyState, Panel } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import { can, ROLE_LABELS } from "~/lib/access";
import { requireMember } from "~/server/permissions.server";
import { recentlyChangedCars, teamCounts } from "~/server/dashboard.server";
import { briefsSharedWith } from "~/server/brief.server";
import { recentSessions } from "~/server/sessions/list.server";
import type { Route } from "./+types/dashboard";

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { car: ["read"] });
  const readsSessions = can(ctx.role, { session: ["read"] });
  const [counts, cars, briefs, sessions] = await Promise.all([
    teamCounts(ctx.team.id),
    recentlyChangedCars(ctx.team.id),
    briefsSharedWith(ctx.user.id, ctx.user.email),
    readsSessions ? recentSessions(ctx.team.id, 5) : null,
  ]);
  return {
    team: ctx.team,
    role: ctx.role,
    memberCount: counts.members,
    carCount: counts.cars,
    canBrief: can(ctx.role, { share: ["create"] }),
    sharedBriefs: briefs.map((b) => ({ id: b.id, sessionName: b.sessionName, teamName: b.teamName, note: b.note, expiresAt: b.expiresAt.toISOString() })),
    recentSessions: sessions
      ? sessions.map((r) => ({
          id: r.id, date: r.date, run: r.run, car: r.car.name, venue: r.venue?.name ?? null, state: r.state,
          claTotalM2: r.claTotalM2, balanceFrontPct: r.balanceFrontPct,
        }))
      : null,
    canUpload: can(ctx.role, { session: ["upload"] }),
    recentCars: cars.map((c) => ({ id: c.id, name: c.name, category: c.category, massKg: c.massKg, setupSheets: c.setupSheets })),
  };
}

export default function Dashboard({ loaderData }: Route.ComponentProps) {
  const { team, role, memberCount, carCount, recentCars, sharedBriefs, canBrief, recentSessions, canUpload } = loaderData;
  const base = `/t/${team.slug}`;
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h1 className="text-2xl font-semibold">{team.name}</h1>
        <p className="text-sm text-ink-soft">
          You are <strong className="text-ink">{ROLE_LABELS[role]}</strong> ·{" "}
          <Link className="underline" to={`${base}/settings`}>
            <span className="num">{memberCount}</span> {memberCount === 1 ? "member" : "members"}
          </Link>
        </p>
      </div>
      {sharedBriefs.length > 0 && (
        <Panel title="Briefs shared with you">
          <ul className="divide-y divide-rule-soft text-sm">
            {sharedBriefs.map((b) => (
              <li key={b.id} className="py-1.5">
                <Link className="font-medium text-accent underline" to={`/brief/shared/${b.id}`}>{b.sessionName}</Link>
                <span className="text-ink-soft"> · {b.teamName} · until {b.expiresAt.slice(0, 10)}</span>
                {b.note && <span className="block text-ink-soft">“{b.note}”</span>}
              </li>
            ))}
          </ul>
        </Panel>
      )}
      {canBrief && (
        <p className="text-sm">
          <Link className="text-accent underline" to={`${base}/briefs`}>Driver briefs</Link>: share one session read-only with a driver.
        </p>
      )}
      <div className="grid gap-4 md:grid-cols-2">
        <Panel
          title={<>Garage {carCount > 0 && <span className="num text-sm font-normal text-ink-faint">({carCount})</span>}</>}
          actions={carCount > 0 ? <Link className="text-sm text-accent underline" to={`${base}/garage`}>All cars</Link> : undefined}
        >
          {carCount === 0 ? (
            <EmptyState
              title="Add your first car"
              action={can(role, { car: ["create"] }) ? { to: `${base}/garage`, label: "Open the Garage" } : undefined}
            >
              The Garage keeps each car's dimensions, weights and setup sheets. Every Balance report starts from a car, so add one
              first{can(role, { car: ["create"] }) ? "." : " — ask an engineer or the owner of the team to add it."}
            </EmptyState>
          ) : (
            <table className="w-full text-sm">
              <thead className="text-left text-ink-faint">
                <tr className="border-b border-rule-soft">
                  <th className="py-1.5 pr-3 font-medium">Car</th>
                  <th className="py-1.5 pr-3 font-medium">Category</th>
                  <th className="py-1.5 pr-3 text-right font-medium">Mass</th>
                  <th className="py-1.5 text-right font-medium">Setup sheets</th>
                </tr>
              </thead>
              <tbody>
                {recentCars.map((c) => (
                  <tr key={c.id} className="border-b border-rule-soft">
                    <td className="py-1.5 pr-3"><Link className="text-accent underline" to={`${base}/garage/${c.id}`}>{c.name}</Link></td>
                    <td className="py-1.5 pr-3 text-ink-soft">{c.category ?? "—"}</td>
                    <td className="num py-1.5 pr-3 text-right">{`${Math.round(c.massKg)} kg`}</td>
                    <td className="num py-1.5 text-right">{c.setupSheets}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </Panel>
        {recentSessions && (
          <Panel
            title="Sessions"
            actions={
              recentSessions.length > 0 ? (
                <span className="flex gap-3 text-sm">
                  {canUpload && <Link className="text-accent underline" to={`${base}/sessions/new`}>Drop a log</Link>}
                  <Link className="text-accent underline" to={`${base}/sessions`}>All sessions</Link>
                </span>
              ) : undefined
            }
          >
            {recentSessions.length === 0 ? (
              <EmptyState title="Drop a log" action={canUpload && carCount > 0 ? { to: `${base}/sessions/new`, label: "Drop a log" } : undefined}>
                After each stint, drop the logger's export: its Balance report appears here.
                {carCount === 0 ? " Add the car to the Garage first." : canUpload ? "" : " An engineer of the team drops the logs."}
              </EmptyState>
            ) : (
              <ul className="divide-y divide-rule-soft text-sm">
                {recentSessions.map((s) => (
                  <li key={s.id} className="py-1.5">
                    <div className="flex items-baseline justify-between gap-2">
                      <Link className="text-accent underline" to={`${base}/sessions/${s.id}`}>{s.date ?? "no date"} · {s.run ?? s.car}</Link>
                      <span className="text-right text-ink-soft">{s.car}{s.venue ? ` · ${s.venue}` : ""}</span>
                    </div>
                    <div className="num flex justify-between gap-2 text-xs text-ink-soft">
                      <span>
                        {s.claTotalM2 === null ? "ClA —" : `ClA ${s.claTotalM2.toFixed(3)} m²`} ·{" "}
                        {s.balanceFrontPct === null ? "balance —" : `${s.balanceFrontPct.toFixed(1)} % front`}
                      </span>
                      <span>{s.state}</span>
                    </div>
                  </li>
                ))}
              </ul>
            )}
          </Panel>
        )}
      </div>
      {role === "driver" && (
        <p className="text-sm text-ink-soft">As a driver you see the team's cars and the Driver briefs your engineers share with you.</p>
      )}
      <Caution compact />
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.team.name ?? "Team"} · Rakeline` }];

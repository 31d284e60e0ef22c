import { Form, Link } from "react-router";
import { and, asc, eq } from "drizzle-orm";
import { cars } from "~/db/schema/garage";
import { SESSION_STATUSES, venues } from "~/db/schema/sessions";
import { db } from "~/server/db.server";
import { can, requireMember } from "~/server/permissions.server";
import { listSessionsPage, sessionPageSchema, teamHasSessions, type SessionRow } from "~/server/sessions/list.server";
import { EmptyState, Caution } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import { SortHeader } from "~/components/garage/table";
import type { Route } from "./+types/list";

const STATE_WORDS: Record<SessionRow["state"], string> = {
  received: "received",
  read: "read",
  checked: "checked",
  flagged: "flagged",
};

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { session: ["read"] });
  const search = Object.fromEntries(new URL(request.url).searchParams);
  const parsed = sessionPageSchema.safeParse(search);
  // A bad filter value (a mistyped date) is dropped with a note, not a broken page.
  const query = parsed.success ? parsed.data : sessionPageSchema.parse({ sort: search.sort, dir: search.dir });
  const problem = parsed.success ? null : parsed.error.issues.map((i) => `${String(i.path[0])}: ${i.message}`).join("; ");
  const [page, any, carRows, venueRows] = await Promise.all([
    listSessionsPage(ctx.team.id, query),
    teamHasSessions(ctx.team.id),
    db.select({ id: cars.id, name: cars.name }).from(cars).where(eq(cars.teamId, ctx.team.id)).orderBy(asc(cars.name)),
    db.select({ id: venues.id, name: venues.name }).from(venues).where(and(eq(venues.teamId, ctx.team.id))).orderBy(asc(venues.name)),
  ]);
  const deleted = new URL(request.url).searchParams.has("deleted");
  return { team: ctx.team, query, problem, deleted, rows: page.rows, hasNext: page.hasNext, any, cars: carRows, venues: venueRows, canUpload: can(ctx.role, { session: ["upload"] }) };
}

function fmt(value: number | null, digits: number, unit: string) {
  return value === null ? <span className="text-ink-faint">—</span> : `${value.toFixed(digits)}${unit}`;
}

function duration(s: number | null) {
  if (s === null) return <span className="text-ink-faint">—</span>;
  const m = Math.floor(s / 60);
  return `${m}:${String(Math.round(s % 60)).padStart(2, "0")}`;
}

function Figure({ children }: { children: React.ReactNode }) {
  return <td className="num whitespace-nowrap px-3 py-1.5 text-right">{children}</td>;
}

function StateBadge({ state, detail }: { state: SessionRow["state"]; detail: string | null }) {
  const look = state === "flagged" ? "border-caution/40 bg-caution-bg text-caution" : state === "checked" ? "border-rule bg-panel text-ink" : "border-dashed border-rule text-ink-soft";
  return (
    <span title={detail ?? undefined} data-state={state} className={`inline-block rounded border px-1.5 py-0.5 text-xs ${look}`}>
      {state === "flagged" && <span aria-hidden>⚑ </span>}
      {STATE_WORDS[state]}
    </span>
  );
}

export default function Sessions({ loaderData }: Route.ComponentProps) {
  const { team, query, problem, deleted, rows, hasNext, any, cars, venues, canUpload } = loaderData;
  const base = `/t/${team.slug}`;
  const pageLink = (page: number) => {
    const next = new URLSearchParams();
    for (const [k, v] of Object.entries(query)) if (v !== undefined && v !== null && k !== "page") next.set(k, String(v));
    next.set("page", String(page));
    return `?${next}`;
  };
  const filtered = Boolean(query.car || query.setup || query.from || query.to || query.venue || query.driver || query.state);
  return (
    <div>
      <header className="mb-4 flex flex-wrap items-center justify-between gap-3">
        <h1 className="text-2xl font-semibold">Sessions</h1>
        <div className="flex gap-2 text-sm">
          <Link to={`${base}/venues`} className="rounded border border-rule bg-panel px-3 py-1.5 font-medium hover:bg-rule-soft">Venues</Link>
          {canUpload && (
            <Link to={`${base}/sessions/new`} className="rounded border border-accent bg-accent px-3 py-1.5 font-medium text-white hover:bg-accent-strong">
              Drop a log
            </Link>
          )}
        </div>
      </header>
      {deleted && (
        <p role="status" className="mb-3 rounded border border-rule bg-rule-soft px-3 py-2 text-sm">The session was deleted with its raw file.</p>
      )}
      {!any ? (
        <EmptyState title="No sessions yet" action={canUpload ? { to: `${base}/sessions/new`, label: "Drop a log" } : undefined}>
          A session is one logger export read by Rakeline: ClA per axle, balance and understeer gradient per speed band.
          {canUpload
            ? " After a stint, drop the export (CSV, TSV or TXT); the car and its setup version come from the Garage, so add the car there first."
            : " An engineer of the team drops the logs after each stint."}
        </EmptyState>
      ) : (
        <>
          <Form method="get" className="mb-3 flex flex-wrap items-end gap-3 text-sm" aria-label="Filter sessions">
            <label className="flex flex-col">
              <span className="text-ink-soft">Car</span>
              <select name="car" defaultValue={query.car ?? ""} className="rounded border border-rule bg-panel px-2 py-1">
                <option value="">Any</option>
                {cars.map((c) => <option key={c.id} value={c.id}>{c.name}</option>)}
              </select>
            </label>
            <label className="flex flex-col">
              <span className="text-ink-soft">Venue</span>
              <select name="venue" defaultValue={query.venue ?? ""} className="rounded border border-rule bg-panel px-2 py-1">
                <option value="">Any</option>
                {venues.map((v) => <option key={v.id} value={v.id}>{v.name}</option>)}
              </select>
            </label>
            <label className="flex flex-col">
              <span className="text-ink-soft">From</span>
              <input type="date" name="from" defaultValue={query.from ?? ""} className="rounded border border-rule bg-panel px-2 py-1" />
            </label>
            <label className="flex flex-col">
              <span className="text-ink-soft">To</span>
              <input type="date" name="to" defaultValue={query.to ?? ""} className="rounded border border-rule bg-panel px-2 py-1" />
            </label>
            <label className="flex flex-col">
              <span className="text-ink-soft">Driver</span>
              <input name="driver" defaultValue={query.driver ?? ""} className="w-36 rounded border border-rule bg-panel px-2 py-1" />
            </label>
            <label className="flex flex-col">
              <span className="text-ink-soft">State</span>
              <select name="state" defaultValue={query.state ?? ""} className="rounded border border-rule bg-panel px-2 py-1">
                <option value="">Any</option>
                {SESSION_STATUSES.map((s) => <option key={s} value={s}>{s}</option>)}
              </select>
            </label>
            <input type="hidden" name="sort" value={query.sort} />
            <input type="hidden" name="dir" value={query.dir} />
            <button className="rounded border border-rule bg-panel px-3 py-1 hover:bg-rule-soft">Filter</button>
            {filtered && <Link to="?" className="py-1 text-accent underline">Clear</Link>}
          </Form>
          {problem && <p role="alert" className="mb-3 text-sm text-danger">Filter left out: {problem}</p>}
          {rows.length === 0 ? (
            <EmptyState title="No session matches">Widen or clear the filter to see the team's sessions.</EmptyState>
          ) : (
            <>
            <ul className="space-y-2 sm:hidden" aria-label="Sessions (compact)">
              {rows.map((r) => (
                <li key={r.id} className="rounded border border-rule bg-panel px-3 py-2 text-sm">
                  <div className="flex items-baseline justify-between gap-2">
                    <Link to={`${base}/sessions/${r.id}`} className="font-medium text-accent underline">
                      {r.date ?? "no date"} · {r.run ?? "run"}
                    </Link>
                    <StateBadge state={r.state} detail={r.statusDetail} />
                  </div>
                  <p className="text-ink-soft">{r.venue?.name ?? "no venue"} · {r.driver?.name ?? "no driver"} · {duration(r.durationS)}</p>
                  <p>{r.car.name} <span className="text-ink-soft">· {r.setup.name} v{r.setup.version}</span></p>
                  <p className="num">ClA {fmt(r.claTotalM2, 3, " m²")} · balance {fmt(r.balanceFrontPct, 1, " % front")}</p>
                </li>
              ))}
            </ul>
            <div className="hidden overflow-x-auto rounded border border-rule bg-panel sm:block">
              <table className="w-full text-sm" aria-label="Sessions">
                <thead className="border-b border-rule bg-rule-soft">
                  <tr>
                    <SortHeader column="date" defaultSort="date" defaultDir="desc">Date</SortHeader>
                    <SortHeader column="venue" defaultSort="date" defaultDir="desc">Venue</SortHeader>
                    <SortHeader column="car" defaultSort="date" defaultDir="desc">Car · setup</SortHeader>
                    <SortHeader column="driver" defaultSort="date" defaultDir="desc">Driver</SortHeader>
                    <SortHeader column="run" defaultSort="date" defaultDir="desc">Run</SortHeader>
                    <SortHeader column="duration" defaultSort="date" defaultDir="desc" align="right">Duration</SortHeader>
                    <SortHeader column="cla" defaultSort="date" defaultDir="desc" align="right">ClA total</SortHeader>
                    <SortHeader column="balance" defaultSort="date" defaultDir="desc" align="right">Balance</SortHeader>
                    <SortHeader column="state" defaultSort="date" defaultDir="desc">State</SortHeader>
                  </tr>
                </thead>
                <tbody>
                  {rows.map((r) => (
                    <tr key={r.id} className="border-b border-rule-soft last:border-0">
                      <td className="whitespace-nowrap px-3 py-1.5">
                        <Link to={`${base}/sessions/${r.id}`} className="font-medium text-accent underline">{r.date ?? "no date"}</Link>
                      </td>
                      <td className="px-3 py-1.5">{r.venue?.name ?? <span className="text-ink-faint">—</span>}</td>
                      <td className="px-3 py-1.5">
                        {r.car.name} <span className="text-ink-soft">· {r.setup.name} v{r.setup.version}</span>
                      </td>
                      <td className="px-3 py-1.5">{r.driver?.name ?? <span className="text-ink-faint">—</span>}</td>
                      <td className="px-3 py-1.5">{r.run ?? <span className="text-ink-faint">—</span>}</td>
                      <Figure>{duration(r.durationS)}</Figure>
                      <Figure>{fmt(r.claTotalM2, 3, " m²")}</Figure>
                      <Figure>{fmt(r.balanceFrontPct, 1, " % front")}</Figure>
                      <td className="px-3 py-1.5"><StateBadge state={r.state} detail={r.statusDetail} /></td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            </>
          )}
          <nav aria-label="Pages" className="mt-3 flex items-center gap-3 text-sm">
            {query.page > 1 && <Link to={pageLink(query.page - 1)} className="text-accent underline">← Newer page</Link>}
            <span className="text-ink-soft">Page {query.page}</span>
            {hasNext && <Link to={pageLink(query.page + 1)} className="text-accent underline">Next page →</Link>}
          </nav>
          <p className="mt-3 text-xs text-ink-soft">
            States: <strong>read</strong> — figures from the first reading of the file; <strong>checked</strong> — the server read the stored file
            again and agrees; <strong>flagged</strong> — the server's figures differ or the file could not be read again (hover for why).
          </p>
          <div className="mt-4"><Caution compact /></div>
        </>
      )}
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export const meta: Route.MetaFunction = () => [{ title: "Sessions · Rakeline" }];

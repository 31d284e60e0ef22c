import { Form, Link, data, useFetcher, useNavigation } from "react-router";
import { z } from "zod";
import { can, requireMember } from "~/server/permissions.server";
import { readFormFields } from "~/server/body.server";
import { listAnnotations, listSavedComparisons, saveComparison } from "~/server/report/annotations.server";
import { getSessionReports } from "~/server/report/session.server";
import { saveComparisonSchema } from "~/lib/report/annotations";
import { NotesList } from "~/components/report/notes";
import { compareReport, CompareInputError, MAX_COMPARED, pickableSessions, pickerChoices } from "~/server/report/compare.server";
import { teamPath } from "~/lib/team-schemas";
import { pivotBands, STANDARD_DENSITY_KG_M3 } from "~/lib/report/compare";
import { ADVICE_CAUTIONS } from "~/lib/report/advice";
import { CAUTIONS } from "~/engine/summary-types";
import { fmt, interval, signed } from "~/lib/report/format";
import { toCsv } from "~/lib/report/csv";
import type { Change } from "~/engine/compare";
import { EmptyState, Panel } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import { CompareChart, SESSION_COLOURS } from "~/components/report/compare-chart";
import { CautionList, ScrollRegion } from "~/components/report/accessible";
import type { Route } from "./+types/compare";

const date = z.string().regex(/^\d{4}-\d{2}-\d{2}$/).optional().catch(undefined);
const filterSchema = z.object({ car: z.string().max(36).optional().catch(undefined), venue: z.string().max(36).optional().catch(undefined), from: date, to: date });

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { session: ["read"], compare: ["read"] });
  const url = new URL(request.url);
  const filters = filterSchema.parse({ car: url.searchParams.get("car") || undefined, venue: url.searchParams.get("venue") || undefined, from: url.searchParams.get("from") || undefined, to: url.searchParams.get("to") || undefined });
  const ids = [...new Set(url.searchParams.getAll("ids").flatMap((v) => v.split(",")).map((s) => s.trim()).filter(Boolean))].slice(0, MAX_COMPARED + 1);
  const [pickable, choices] = await Promise.all([pickableSessions(ctx.team.id, filters), pickerChoices(ctx.team.id)]);
  let result: Awaited<ReturnType<typeof compareReport>> | null = null;
  let problem: string | null = null;
  if (ids.length >= 2) {
    try {
      result = await compareReport(ctx.team.id, ids, (id) => `${teamPath(ctx.team.slug)}/sessions/${id}`);
    } catch (e) {
      if (!(e instanceof CompareInputError)) throw e;
      problem = e.message;
    }
  }
  const [notes, saved] = await Promise.all([result ? listAnnotations(ctx.team.id, result.sessions.map((x) => x.id)) : [], listSavedComparisons(ctx.team.id)]);
  return { team: ctx.team, filters, ids, pickable, choices, result, problem, notes, saved, canSave: can(ctx.role, { session: ["annotate"] }), canBrief: can(ctx.role, { share: ["create"] }) };
}

export async function action({ request, params }: Route.ActionArgs) {
  // Saving a comparison is team data an analyst may write, like a note.
  const ctx = await requireMember(request, params.teamSlug, { compare: ["read"], session: ["annotate"] });
  const fields = await readFormFields(request);
  if (fields.intent !== "save") throw data("Unknown action: save.", { status: 400 });
  const parsed = saveComparisonSchema.safeParse(fields);
  if (!parsed.success) {
    const errors: Record<string, string> = {};
    for (const issue of parsed.error.issues) errors[String(issue.path[0] ?? "name")] ??= issue.message;
    return data({ errors }, { status: 400 });
  }
  const found = await getSessionReports(ctx.team.id, parsed.data.ids);
  if (found.length !== parsed.data.ids.length) return data({ errors: { ids: "Some of these sessions are not in this team." } }, { status: 400 });
  await saveComparison(ctx.team.id, ctx.user.id, parsed.data.name, parsed.data.ids);
  return { ok: true, name: parsed.data.name };
}

function SaveForm({ ids }: { ids: string[] }) {
  const fetcher = useFetcher<{ ok?: boolean; name?: string; errors?: Record<string, string> }>();
  const error = fetcher.data?.errors ? Object.values(fetcher.data.errors)[0] : null;
  return (
    <fetcher.Form method="post" className="flex flex-wrap items-end gap-2 text-sm" aria-label="Save this comparison">
      <input type="hidden" name="intent" value="save" />
      <input type="hidden" name="ids" value={ids.join(",")} />
      <label className="flex flex-col">
        <span className="text-xs text-ink-soft">Save as</span>
        <input name="name" required maxLength={80} placeholder="e.g. Splitter test, May–June" className="rounded border border-rule px-2 py-1" />
      </label>
      <button type="submit" disabled={fetcher.state !== "idle"} className="rounded border border-rule px-3 py-1 hover:bg-rule-soft">
        {fetcher.state !== "idle" ? "Saving…" : "Save comparison"}
      </button>
      {fetcher.data?.ok && <span role="status" className="text-xs text-ink-soft">Saved as “{fetcher.data.name}”.</span>}
      {error && <span role="alert" className="text-xs text-danger">{error}</span>}
    </fetcher.Form>
  );
}

function ChangeCell({ c, digits, unit }: { c: Change | undefined; digits: number; unit: string }) {
  if (!c || c.change === null) return <td className="num px-2 py-1 text-right text-ink-faint">—</td>;
  return (
    <td className="num whitespace-nowrap px-2 py-1 text-right" data-clear={c.clear ? "yes" : "no"} title={c.ci95 ? `95 %: ${interval(c.ci95, digits)} ${unit}` : "no interval"}>
      <span className={c.clear ? "font-semibold" : "text-ink-faint"}>{signed(c.change, digits)}</span> <span className="text-xs text-ink-soft">({interval(c.ci95, digits)})</span>{" "}
      <span className={`text-xs ${c.clear ? "" : "text-ink-faint"}`}>{c.clear ? "● clear" : "○ not clear"}</span>
    </td>
  );
}

function downloadCsv(name: string, text: string) {
  const a = document.createElement("a");
  a.href = URL.createObjectURL(new Blob([text], { type: "text/csv" }));
  a.download = name;
  document.body.append(a);
  a.click();
  a.remove();
}

export default function Compare({ loaderData }: Route.ComponentProps) {
  const { team, filters, ids, pickable, choices, result, problem, notes, saved, canSave, canBrief } = loaderData;
  const navigation = useNavigation();
  const busy = navigation.state !== "idle" && navigation.location?.pathname.endsWith("/compare");
  const base = teamPath(team.slug);
  const selected = new Set(ids);
  const pivot = result ? pivotBands(result.sessions) : [];
  const diffById = new Map(result?.differences.map((d) => [d.id, d]) ?? []);

  const csv = () => {
    if (!result) return;
    const head = ["band_kmh", ...result.sessions.flatMap((s) => [`${s.name} balance_front_pct`, `${s.name} understeer_deg_per_g`, `${s.name} aero_load_front_n_std_air`, `${s.name} aero_load_rear_n_std_air`]), ...result.differences.flatMap((d) => [`change ${d.id} balance_pct`, `change ${d.id} clear`])];
    const rows = pivot.map((r) => [
      r.band,
      ...r.cells.flatMap((c) => [c?.balance_front_pct ?? null, c?.understeer_gradient_deg_per_g ?? null, c?.aero_load_front_n_std_air ?? null, c?.aero_load_rear_n_std_air ?? null]),
      ...result.differences.flatMap((d) => {
        const b = d.comparison.bands.find((x) => x.min_kmh === r.min_kmh && x.max_kmh === r.max_kmh);
        return [b?.balance_front_pct.change ?? null, b ? (b.balance_front_pct.clear ? "clear" : "not clear") : null];
      }),
    ]);
    downloadCsv("rakeline-compare.csv", toCsv(head, rows));
  };

  return (
    <div className="space-y-4">
      <header>
        <h1 className="text-2xl font-semibold">Compare</h1>
        <p className="text-sm text-ink-soft">Pick two or more sessions: the first is the baseline, each other is compared with it band by band, with 95 % intervals.</p>
      </header>

      <Panel title="Pick sessions">
        <Form method="get" className="flex flex-wrap items-end gap-3 text-sm" aria-label="Filters">
          {ids.length > 0 && <input type="hidden" name="ids" value={ids.join(",")} />}
          <label className="flex flex-col">
            <span className="text-xs text-ink-soft">Car</span>
            <select name="car" defaultValue={filters.car ?? ""} className="rounded border border-rule px-2 py-1">
              <option value="">All cars</option>
              {choices.cars.map((c) => <option key={c.id} value={c.id}>{c.name}</option>)}
            </select>
          </label>
          <label className="flex flex-col">
            <span className="text-xs text-ink-soft">Venue</span>
            <select name="venue" defaultValue={filters.venue ?? ""} className="rounded border border-rule px-2 py-1">
              <option value="">All venues</option>
              {choices.venues.map((v) => <option key={v.id} value={v.id}>{v.name}</option>)}
            </select>
          </label>
          <label className="flex flex-col">
            <span className="text-xs text-ink-soft">From</span>
            <input type="date" name="from" defaultValue={filters.from ?? ""} className="rounded border border-rule px-2 py-1" />
          </label>
          <label className="flex flex-col">
            <span className="text-xs text-ink-soft">To</span>
            <input type="date" name="to" defaultValue={filters.to ?? ""} className="rounded border border-rule px-2 py-1" />
          </label>
          <button type="submit" className="rounded border border-rule px-3 py-1 hover:bg-rule-soft">Filter</button>
        </Form>
        {saved.length > 0 && (
          <div className="mt-3 text-sm" data-testid="saved-comparisons">
            <span className="text-xs text-ink-soft">Saved comparisons: </span>
            {saved.map((c, i) => (
              <span key={c.id}>
                {i > 0 && " · "}
                <Link to={`?ids=${c.sessionIds.join(",")}`} className="text-accent hover:underline">{c.name}</Link>
                {canBrief && (
                  <Link to={`${base}/briefs?comparison=${encodeURIComponent(c.id)}`} className="ml-1 text-xs text-ink-soft hover:text-accent hover:underline" aria-label={`Brief link for ${c.name}`}>
                    (Brief link…)
                  </Link>
                )}
              </span>
            ))}
          </div>
        )}
        {pickable.length === 0 ? (
          <div className="mt-3">
            <EmptyState title="No sessions match" action={{ to: `${base}/sessions/new`, label: "Drop a log" }}>
              Loosen the filters, or drop a log to analyse a stint first.
            </EmptyState>
          </div>
        ) : (
          <Form method="get" className="mt-3" aria-label="Sessions to compare">
            {filters.car && <input type="hidden" name="car" value={filters.car} />}
            {filters.venue && <input type="hidden" name="venue" value={filters.venue} />}
            {filters.from && <input type="hidden" name="from" value={filters.from} />}
            {filters.to && <input type="hidden" name="to" value={filters.to} />}
            <ul className="max-h-64 divide-y divide-rule-soft overflow-y-auto rounded border border-rule text-sm">
              {pickable.map((p) => (
                <li key={p.id}>
                  <label className="flex flex-wrap items-baseline gap-x-3 px-3 py-1.5 hover:bg-rule-soft">
                    <input type="checkbox" name="ids" value={p.id} defaultChecked={selected.has(p.id)} />
                    <span className="font-medium">{p.name}</span>
                    <span className="text-xs text-ink-soft">{[p.date, p.venue, p.car, `${p.setup} v${p.setupVersion}`, p.run].filter(Boolean).join(" · ")}</span>
                  </label>
                </li>
              ))}
            </ul>
            <button type="submit" className="mt-2 rounded border border-accent bg-accent px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-strong">
              Compare selected
            </button>
          </Form>
        )}
      </Panel>

      {busy && <p className="text-sm text-ink-soft" role="status">Loading the comparison…</p>}
      {problem && <p className="rounded border border-caution/30 bg-caution-bg px-3 py-2 text-sm text-caution" role="alert">{problem}</p>}
      {!result && !problem && ids.length < 2 && <p className="text-sm text-ink-soft">Tick two or more sessions above and press Compare selected.</p>}

      {result && (
        <div className={`space-y-4 ${busy ? "opacity-60" : ""}`} data-testid="comparison">
          <Panel title="Sessions">
            <ScrollRegion label="Compared sessions">
              <table className="w-full text-sm">
                <thead className="border-b border-rule text-xs text-ink-soft">
                  <tr>
                    <th scope="col" className="px-2 py-1 text-left font-medium">Session</th>
                    <th scope="col" className="px-2 py-1 text-left font-medium">Setup</th>
                    <th scope="col" className="px-2 py-1 text-right font-medium">Air kg/m³</th>
                    <th scope="col" className="px-2 py-1 text-right font-medium text-front">ClA F m²</th>
                    <th scope="col" className="px-2 py-1 text-right font-medium text-rear">ClA R m²</th>
                    <th scope="col" className="px-2 py-1 text-right font-medium">Balance %</th>
                    <th scope="col" className="px-2 py-1 text-right font-medium">Δ balance vs baseline (95 %)</th>
                  </tr>
                </thead>
                <tbody>
                  {result.sessions.map((s, i) => (
                    <tr key={s.id} className="border-b border-rule-soft">
                      <th scope="row" className="px-2 py-1 text-left font-medium">
                        <span aria-hidden className="mr-1.5 inline-block h-2.5 w-2.5 rounded-full" style={{ background: SESSION_COLOURS[i % SESSION_COLOURS.length] }} />
                        <Link to={s.url} className="hover:text-accent">{s.name}</Link>
                        <div className="text-xs font-normal text-ink-soft">{[s.date, s.venue, s.car.name, i === 0 ? "baseline" : null].filter(Boolean).join(" · ")}</div>
                      </th>
                      <td className="px-2 py-1">{s.setup.sheet} v{s.setup.version}</td>
                      <td className="num px-2 py-1 text-right">{fmt(s.air_density_kg_m3, 3)}</td>
                      <td className="num px-2 py-1 text-right">{fmt(s.cla_front_m2, 3)}</td>
                      <td className="num px-2 py-1 text-right">{fmt(s.cla_rear_m2, 3)}</td>
                      <td className="num px-2 py-1 text-right">{fmt(s.balance_front_pct, 1)}</td>
                      {i === 0 ? <td className="px-2 py-1 text-right text-xs text-ink-soft">baseline</td> : <ChangeCell c={diffById.get(s.id)?.comparison.balance_front_pct} digits={1} unit="points" />}
                    </tr>
                  ))}
                </tbody>
              </table>
            </ScrollRegion>
          </Panel>

          {canSave && <SaveForm ids={result.sessions.map((x) => x.id)} />}
          <Panel title="What changed, and what the balance did">
            <ul className="space-y-3 text-sm" data-testid="setup-changes">
              {result.differences.map((d) => {
                const s = result.sessions.find((x) => x.id === d.id)!;
                return (
                  <li key={d.id}>
                    <div className="font-medium">{s.name} against the baseline</div>
                    {d.setup_changes.length > 0 && (
                      <ul className="num text-xs text-ink-soft">
                        {d.setup_changes.map((r) => <li key={r.field}>{r.label}: {r.before} → {r.after} {r.unit}</li>)}
                      </ul>
                    )}
                    <ul className="mt-1 list-disc pl-5">
                      {d.sentences.map((t) => <li key={t}>{t}</li>)}
                    </ul>
                    {d.comparison.notes.map((n) => <p key={n} className="text-xs text-caution">Note: {n}.</p>)}
                  </li>
                );
              })}
            </ul>
            {notes.length > 0 && (
              <div className="mt-3">
                <h3 className="text-sm font-semibold">Notes on these sessions</h3>
                {result.sessions.map((x) => {
                  const own = notes.filter((n) => n.sessionId === x.id);
                  return own.length ? (
                    <div key={x.id} className="mt-1">
                      <div className="text-xs font-medium">{x.name}</div>
                      <NotesList notes={own} />
                    </div>
                  ) : null;
                })}
              </div>
            )}
            <p className="mt-2 text-xs text-ink-soft">"Clear" means the change's 95 % interval excludes zero; at 95 % about one clear change in twenty is noise.</p>
          </Panel>

          <Panel title="Advice and cautions">
            {result.sessions.some((x) => x.advice.length > 0) ? (
              <ul className="space-y-2 text-sm" data-testid="compare-advice">
                {result.sessions.flatMap((x) =>
                  x.advice.map((a) => (
                    <li key={`${x.id}-${a.problem}`}>
                      <span className="font-medium">{x.name}:</span> {a.evidence} <span className="font-medium">{a.direction}</span>{" "}
                      <span className="text-xs text-ink-soft">(usual direction of change, common practice)</span>
                    </li>
                  )),
                )}
              </ul>
            ) : (
              <p className="text-sm text-ink-soft">No high-speed balance problem stands out from the intervals of these sessions.</p>
            )}
            <CautionList cautions={[...CAUTIONS, ADVICE_CAUTIONS[2]]} />
          </Panel>

          <Panel title="Overlay">
            <CompareChart sessions={result.sessions} />
          </Panel>

          <Panel
            title="Speed bands side by side"
            actions={<button type="button" onClick={csv} className="rounded border border-rule px-2.5 py-1 text-sm hover:bg-rule-soft">Download CSV</button>}
          >
            <ScrollRegion label="Speed bands side by side">
              <table className="w-full text-sm" data-testid="pivot">
                <thead className="border-b border-rule text-xs text-ink-soft">
                  <tr>
                    <th scope="col" className="px-2 py-1 text-left font-medium">Band km/h</th>
                    {result.sessions.map((s) => <th key={s.id} scope="col" className="px-2 py-1 text-right font-medium">{s.name}: balance % (95 %) · understeer deg/g · load F/R N*</th>)}
                    {result.differences.map((d) => <th key={d.id} scope="col" className="px-2 py-1 text-right font-medium">Δ balance, {result.sessions.find((s) => s.id === d.id)!.name}</th>)}
                  </tr>
                </thead>
                <tbody>
                  {pivot.map((r) => (
                    <tr key={r.band} className="border-b border-rule-soft">
                      <th scope="row" className="num px-2 py-1 text-left font-medium">{r.band}</th>
                      {r.cells.map((c, i) => (
                        <td key={i} className="num whitespace-nowrap px-2 py-1 text-right">
                          {c ? (
                            <>
                              {fmt(c.balance_front_pct, 1)} <span className="text-xs text-ink-soft">({interval(c.balance_front_ci95_pct, 1)})</span> · {fmt(c.understeer_gradient_deg_per_g, 2)} ·{" "}
                              <span className="text-front">{fmt(c.aero_load_front_n_std_air, 0)}</span>/<span className="text-rear">{fmt(c.aero_load_rear_n_std_air, 0)}</span>
                            </>
                          ) : "—"}
                        </td>
                      ))}
                      {result.differences.map((d) => <ChangeCell key={d.id} c={d.comparison.bands.find((b) => b.min_kmh === r.min_kmh && b.max_kmh === r.max_kmh)?.balance_front_pct} digits={1} unit="points" />)}
                    </tr>
                  ))}
                </tbody>
              </table>
            </ScrollRegion>
            <p className="mt-1 text-xs text-ink-soft">
              * Aero loads normalised to {STANDARD_DENSITY_KG_M3} kg/m³ (load × {STANDARD_DENSITY_KG_M3} / the session's air density){result.densities_differ ? "; the sessions' air densities differ" : ""}. ClA and balance need no normalising.
            </p>
          </Panel>
        </div>
      )}
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export function meta() {
  return [{ title: "Compare · Rakeline" }];
}

import { Link, data } from "react-router";
import { can, requireMember } from "~/server/permissions.server";
import { readFormFields } from "~/server/body.server";
import { addAnnotation, changeAnnotation, listAnnotations } from "~/server/report/annotations.server";
import { carSetupVersions, sessionHistory } from "~/server/report/history.server";
import { annotationSchema, noteChangeSchema } from "~/lib/report/annotations";
import { NoteForm, NotesList } from "~/components/report/notes";
import { ids } from "~/server/garage-routes.server";
import { getSessionReport } from "~/server/report/session.server";
import { teamPath } from "~/lib/team-schemas";
import { verdictSentence } from "~/lib/report/verdict";
import { ADVICE_CAUTIONS, adviceFor } from "~/lib/report/advice";
import { fmt } from "~/lib/report/format";
import { EmptyState, Panel } from "~/components/ui/panels";
import { ErrorView } from "~/components/ui/error-view";
import { BandTable, HeadlineFigures, WarningsList } from "~/components/report/figures";
import { SideView } from "~/components/report/side-view";
import { CautionList } from "~/components/report/accessible";
import { DeleteSession, JobState, ReanalyseForm, ResultHistory } from "~/components/report/actions";
import { ProcessingState, SessionDetails } from "~/components/report/details";
import type { SessionSummary } from "~/engine/summary-types";
import type { SessionHead } from "~/server/report/session.server";
import printCss from "~/components/report/report-print.css?url";
import { ReportCharts } from "~/components/report/report-charts";
import type { Route } from "./+types/session";

export async function loader({ request, params }: Route.LoaderArgs) {
  const ctx = await requireMember(request, params.teamSlug, { session: ["read"] });
  const { sessionId } = ids(params, "sessionId");
  const canReanalyse = can(ctx.role, { session: ["upload"] });
  // The reads are independent (each filters by the team): one round of queries, not two in a row. An
  // unknown or other team's id answers 404 from getSessionReport; the others then found nothing.
  const report = getSessionReport(ctx.team.id, sessionId);
  const [{ head, summary }, notes, history, setupChoices] = await Promise.all([
    report,
    listAnnotations(ctx.team.id, [sessionId]),
    sessionHistory(ctx.team.id, sessionId),
    canReanalyse ? report.then(({ head }) => carSetupVersions(ctx.team.id, head.car.id)) : Promise.resolve([]),
  ]);
  // Traces are fetched by the charts from the data API; the page carries the summary only.
  const lean = summary ? { ...summary, traces: undefined } : null;
  return {
    team: ctx.team,
    notes,
    canAnnotate: can(ctx.role, { session: ["annotate"] }),
    may: { reanalyse: canReanalyse, delete: can(ctx.role, { session: ["delete"] }), brief: can(ctx.role, { share: ["create"] }) },
    editor: { userId: ctx.user.id, isOwner: ctx.role === "owner" },
    history,
    setupChoices,
    head,
    summary: lean as SessionSummary | null,
    verdict: summary ? verdictSentence(summary) : null,
    advice: summary ? adviceFor(summary) : [],
  };
}

function firstErrors(issues: { path: PropertyKey[]; message: string }[]) {
  const errors: Record<string, string> = {};
  for (const issue of issues) errors[String(issue.path[0] ?? "body")] ??= issue.message;
  return errors;
}

export async function action({ request, params }: Route.ActionArgs) {
  const ctx = await requireMember(request, params.teamSlug, { session: ["annotate"] });
  const { sessionId } = ids(params, "sessionId");
  const fields = await readFormFields(request);
  if (fields.intent === "edit-note" || fields.intent === "delete-note") {
    await getSessionReport(ctx.team.id, sessionId);
    const parsed = noteChangeSchema.safeParse(fields);
    if (!parsed.success) return data({ errors: firstErrors(parsed.error.issues) }, { status: 400 });
    const change = parsed.data.intent === "delete-note" ? ("delete" as const) : { body: parsed.data.body };
    const done = await changeAnnotation(ctx.team.id, { userId: ctx.user.id, isOwner: ctx.role === "owner" }, sessionId, parsed.data.noteId, change);
    if (done === "not_found") throw data("No such note on this session.", { status: 404 });
    if (done === "not_yours") throw data("Only the note's author or the team's owner may change it.", { status: 403 });
    return { ok: true };
  }
  if (fields.intent !== "annotate") throw data("Unknown action: annotate, edit-note or delete-note.", { status: 400 });
  const { summary } = await getSessionReport(ctx.team.id, sessionId);
  const parsed = annotationSchema.safeParse(fields);
  if (!parsed.success) return data({ errors: firstErrors(parsed.error.issues) }, { status: 400 });
  let band: [number, number] | null = null;
  if (parsed.data.band) {
    const [min, max] = parsed.data.band.split("-").map(Number);
    if (!summary?.bands.some((b) => b.min_kmh === min && b.max_kmh === max)) return data({ errors: { band: "That speed band is not one of this session's." } }, { status: 400 });
    band = [min, max];
  }
  await addAnnotation(ctx.team.id, ctx.user.id, sessionId, parsed.data.body, band);
  return { ok: true };
}

function airWords(s: SessionSummary, head: SessionHead): string {
  if (head.air.source === "venue_altitude") return "ISA at the venue's altitude";
  if (s.air.source === "given") return `from the session's weather: ${fmt(s.air.temp_c, 1)} °C, ${fmt(s.air.pressure_hpa, 1)} hPa${s.air.humidity_pct === null ? ", dry air" : `, ${fmt(s.air.humidity_pct, 0)} % humidity`}`;
  if (s.air.source === "partly_given") return `partly given (${fmt(s.air.temp_c, 1)} °C, ${fmt(s.air.pressure_hpa, 1)} hPa), ISA for the rest`;
  return "ISA sea level, assumed: enter the weather for a firmer ClA";
}

function fuelWords(s: SessionSummary): string {
  const f = s.fuel;
  const change = `static load ${fmt(f.static_load_change_front_n, 0)} N front, ${fmt(f.static_load_change_rear_n, 0)} N rear over the stint`;
  if (f.source === "given") return `given: ${fmt(f.start_kg, 1)} → ${fmt(f.end_kg, 1)} kg; ${change}`;
  if (f.source === "fitted_drift") return `not given; fitted trend: ${change}`;
  return "not given and not modelled (short log)";
}

export default function BalanceReport({ loaderData }: Route.ComponentProps) {
  const { head, summary: s, verdict, advice, team, notes, canAnnotate, may, editor, history, setupChoices } = loaderData;
  const base = teamPath(team.slug);
  const apiBase = `/api/t/${encodeURIComponent(team.slug)}/sessions/${encodeURIComponent(head.id)}`;
  return (
    <div className="report space-y-4">
      <header className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <p className="text-xs text-ink-soft print:hidden">
            <Link to={`${base}/sessions`} className="hover:text-accent">Sessions</Link> / Balance report
          </p>
          <h1 className="text-2xl font-semibold">{head.name}</h1>
          <p className="text-sm text-ink-soft">
            {[head.car.name, `${head.setup.sheetName} v${head.setup.version}`, head.venueName, head.sessionDate, head.runLabel, head.driverName].filter(Boolean).join(" · ")}
          </p>
        </div>
        <div className="flex flex-wrap items-center gap-2 print:hidden">
          <ProcessingState head={head} compact />
          {s && (
            <a className="rounded border border-rule px-2.5 py-1 text-sm hover:bg-rule-soft" href={`/api/sessions/${head.id}/bands.csv?team=${encodeURIComponent(team.slug)}`} download>
              Bands CSV
            </a>
          )}
          <Link className="rounded border border-rule px-2.5 py-1 text-sm hover:bg-rule-soft" to={`${base}/compare?ids=${head.id}`}>
            Compare…
          </Link>
          {may.brief && (
            <Link className="rounded border border-rule px-2.5 py-1 text-sm hover:bg-rule-soft" to={`${base}/briefs?session=${encodeURIComponent(head.id)}`}>
              Brief link…
            </Link>
          )}
        </div>
      </header>

      {!s ? (
        <EmptyState title="No figures yet">
          The log has not been read yet ({head.status}). {head.statusDetail ?? "The figures appear here once the analysis has run; reload in a moment."}
        </EmptyState>
      ) : (
        <>
          <p className="rounded border border-rule bg-panel px-4 py-3 text-lg leading-snug" data-testid="verdict">
            {verdict}
          </p>
          <div className="grid gap-4 lg:grid-cols-[3fr_2fr] print:grid-cols-[3fr_2fr]">
            <Panel title="Headline figures">
              <HeadlineFigures s={s} airWords={airWords(s, head)} fuelWords={fuelWords(s)} />
            </Panel>
            <Panel title="CoP against CoG">
              <SideView summary={s} id="side-view" />
            </Panel>
          </div>
          <Panel title="Speed bands">
            <BandTable bands={s.bands} id="band-table" />
          </Panel>
          <div className="report-noprint">
            <Panel title="Charts">
              <ReportCharts s={s} sessionId={head.id} teamSlug={team.slug} />
            </Panel>
          </div>
          <div className="grid gap-4 lg:grid-cols-2 print:grid-cols-2">
            <Panel title="Warnings and what to do">
              <WarningsList s={s} />
            </Panel>
            <Panel title="Advice and cautions">
              {advice.length > 0 ? (
                <ul className="space-y-2 text-sm" data-testid="advice">
                  {advice.map((a) => (
                    <li key={a.problem}>
                      <div>{a.evidence}</div>
                      <div className="font-medium">{a.direction}</div>
                      <div className="text-xs text-ink-soft">Usual direction of change: common practice, not a prescription.</div>
                    </li>
                  ))}
                </ul>
              ) : (
                <p className="text-sm text-ink-soft">No high-speed balance problem stands out from the intervals of this stint.</p>
              )}
              <CautionList cautions={s.cautions.length ? [...s.cautions, ADVICE_CAUTIONS[2]] : ADVICE_CAUTIONS} />
            </Panel>
          </div>
        </>
      )}
      <div className="report-noprint">
        <Panel title="Notes">
          <NotesList notes={notes} editor={canAnnotate ? editor : undefined} />
          {canAnnotate && <NoteForm bands={s?.bands ?? []} />}
        </Panel>
      </div>
      <div className="grid gap-4 lg:grid-cols-2 print:hidden">
        <Panel title="Session and setup">
          <SessionDetails head={head} />
        </Panel>
        <Panel title="Processing">
          <JobState job={history.openJob} />
          <ProcessingState head={head} jobShown={history.openJob !== null} />
          {may.reanalyse && <ReanalyseForm action={`${apiBase}/reanalyse`} setups={setupChoices} currentSetupId={head.setup.id} busy={history.openJob !== null} />}
          <ResultHistory results={history.results} />
        </Panel>
      </div>
      {may.delete && (
        <div className="print:hidden">
          <DeleteSession action={`${apiBase}/delete`} name={head.name} />
        </div>
      )}
      {s && s.notes.length > 0 && (
        <div className="report-noprint"><Panel title="How to read these figures">
          <ul className="list-disc pl-5 text-sm text-ink-soft">
            {s.notes.map((n) => (
              <li key={n}>{n}</li>
            ))}
          </ul>
        </Panel></div>
      )}
    </div>
  );
}

export const links: Route.LinksFunction = () => [{ rel: "stylesheet", href: printCss }];

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorView error={error} />;
}

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `${data.head.name} · Balance report · Rakeline` : "Balance report · Rakeline" }];
}

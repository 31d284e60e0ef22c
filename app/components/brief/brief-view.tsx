/** What a driver sees of one session: the plain headline, balance against speed, the side view, the note, the cautions. */
import { useMemo } from "react";
import type uPlot from "uplot";
import type { SessionSummary } from "~/engine/summary-types";
import { UPlotChart, type ChartData } from "~/components/charts/uplot-chart";
import { whiskerHook } from "~/components/charts/whiskers";
import { SideView } from "~/components/report/side-view";
import { Caution } from "~/components/ui/panels";
import { Wordmark } from "~/components/ui/wordmark";
import { bandPointChart, rangeWithIntervals } from "~/lib/report/chart-data";
import { fmt } from "~/lib/report/format";
import { briefHeadline } from "~/lib/brief-words";

const GREY = "#474c57";
const axis = (label: string): uPlot.Axis => ({ label, stroke: GREY, grid: { stroke: "#eceef1", width: 1 }, font: "11px ui-sans-serif, system-ui", labelFont: "11px ui-sans-serif, system-ui", labelSize: 18 });

export type BriefData = { sessionName: string; sessionDate: string | null; teamName: string; note: string | null; expiresAt: string; summary: SessionSummary };

/** The engineer's note for the driver, when there is one (every kind of Driver brief shows it). */
export function EngineerNote({ note }: { note: string | null }) {
  if (!note) return null;
  return (
    <section className="rounded border border-rule bg-panel px-4 py-3">
      <h2 className="mb-1 text-sm font-semibold">From your engineer</h2>
      <p className="whitespace-pre-line">{note}</p>
    </section>
  );
}

export function BriefView({ brief }: { brief: BriefData }) {
  const s = brief.summary;
  const { headline, speed } = briefHeadline(s);
  const balance = useMemo(() => bandPointChart(s, (b) => b.balance_front_pct, (b) => b.balance_front_ci95_pct), [s]);
  const range = rangeWithIntervals(balance.data[1], balance.intervals[1]);
  const options = useMemo<Omit<uPlot.Options, "width" | "height">>(
    () => ({
      series: [
        { label: "Speed km/h" },
        { label: "Balance % front", stroke: GREY, width: 0, paths: () => null, points: { show: true, size: 8, stroke: GREY, fill: "#fff", width: 2 } },
      ],
      axes: [axis("Speed km/h"), axis("Balance % front")],
      scales: { x: { time: false }, y: range ? { range: () => range } : {} },
      hooks: { draw: [whiskerHook(balance.intervals, { 1: GREY })] },
    }),
    [balance, range],
  );
  const rows = s.bands.filter((b) => b.mean_speed_kmh !== null);
  return (
    <main id="main" tabIndex={-1} className="mx-auto max-w-3xl space-y-5 px-4 py-6">
      <header className="space-y-1">
        <Wordmark />
        <p className="text-sm text-ink-soft">
          Driver brief from {brief.teamName} · {brief.sessionName}
          {brief.sessionDate ? ` · ${brief.sessionDate}` : ""}
        </p>
        <h1 className="text-2xl font-semibold" data-testid="brief-headline">{headline}</h1>
        {speed && <p className="text-sm text-ink-soft">Read from the fastest speed band with a balance: {speed}.</p>}
      </header>
      <EngineerNote note={brief.note} />
      <section className="rounded border border-rule bg-panel px-4 py-3">
        <UPlotChart
          title="Balance against speed (% of the aero load on the front axle, 95 % whiskers)"
          fileName="brief-balance"
          optionsKey="brief-balance"
          options={options}
          data={balance.data as ChartData}
          fallback={
            <table className="num w-full text-sm">
              <thead>
                <tr><th scope="col" className="text-right font-medium">km/h</th><th scope="col" className="text-right font-medium">% front</th></tr>
              </thead>
              <tbody>
                {rows.map((b) => (
                  <tr key={b.min_kmh}><td className="text-right">{fmt(b.mean_speed_kmh, 0)}</td><td className="text-right">{fmt(b.balance_front_pct, 1)}</td></tr>
                ))}
              </tbody>
            </table>
          }
        />
      </section>
      <section className="overflow-x-auto rounded border border-rule bg-panel px-4 py-3" tabIndex={0} role="region" aria-label="Side view">
        <h2 className="mb-2 text-sm font-semibold">Side view: the car's centre of gravity and where the aero load acts at each speed</h2>
        <SideView summary={s} />
      </section>
      <Caution />
      <p className="text-xs text-ink-faint">This link is read-only and works until {brief.expiresAt.slice(0, 10)}. It shows this one session and nothing else of the team.</p>
    </main>
  );
}

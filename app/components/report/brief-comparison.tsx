/**
 * What a driver sees of a saved comparison: each session's headline in plain words, the balance against
 * speed of every session on one chart (95 % whiskers), the engineer's note and the cautions. Read-only.
 */
import { useMemo } from "react";
import type uPlot from "uplot";
import type { SessionSummary } from "~/engine/summary-types";
import { UPlotChart, type ChartData } from "~/components/charts/uplot-chart";
import { whiskerHook } from "~/components/charts/whiskers";
import { Caution } from "~/components/ui/panels";
import { Wordmark } from "~/components/ui/wordmark";
import { rangeWithIntervals } from "~/lib/report/chart-data";
import { balanceOverlay } from "~/lib/report/overlay";
import { fmt } from "~/lib/report/format";
import { briefHeadline } from "~/lib/brief-words";
import { SESSION_COLOURS } from "./compare-chart";
import { ScrollRegion } from "./accessible";
import { EngineerNote } from "~/components/brief/brief-view";

export type ComparisonBriefData = {
  comparisonName: string;
  teamName: string;
  note: string | null;
  expiresAt: string;
  sessions: { name: string; sessionDate: string | null; summary: SessionSummary }[];
};

const GREY = "#474c57";
const axis = (label: string): uPlot.Axis => ({ label, stroke: GREY, grid: { stroke: "#eceef1", width: 1 }, font: "11px ui-sans-serif, system-ui", labelFont: "11px ui-sans-serif, system-ui", labelSize: 18 });

export function ComparisonBriefView({ brief }: { brief: ComparisonBriefData }) {
  const overlay = useMemo(() => balanceOverlay(brief.sessions), [brief.sessions]);
  const range = rangeWithIntervals(overlay.cols.slice(1).flat(), Object.values(overlay.intervals).flat());
  const options = useMemo<Omit<uPlot.Options, "width" | "height">>(() => {
    const colours: Record<number, string> = {};
    const series: uPlot.Series[] = [{ label: "Band mid km/h" }];
    brief.sessions.forEach((x, i) => {
      const stroke = SESSION_COLOURS[i % SESSION_COLOURS.length];
      colours[i + 1] = stroke;
      series.push({ label: x.name, stroke, width: 1.5, spanGaps: true, dash: i % 2 ? [6, 4] : undefined, points: { show: true, size: 8, stroke, fill: "#fff", width: 2 } });
    });
    return {
      series,
      axes: [axis("Speed band mid km/h"), axis("Balance % front")],
      scales: { x: { time: false }, y: range ? { range: () => range } : {} },
      hooks: { draw: [whiskerHook(overlay.intervals, colours)] },
    };
  }, [brief.sessions, overlay, range]);
  return (
    <main id="main" tabIndex={-1} className="mx-auto max-w-3xl space-y-5 px-4 py-6">
      <header className="space-y-1">
        <Wordmark />
        <p className="text-sm text-ink-soft">Driver brief from {brief.teamName} · a comparison of {brief.sessions.length} sessions</p>
        <h1 className="text-2xl font-semibold" data-testid="brief-comparison-name">{brief.comparisonName}</h1>
      </header>
      <EngineerNote note={brief.note} />
      <section className="rounded border border-rule bg-panel px-4 py-3">
        <h2 className="mb-2 text-sm font-semibold">How each session balances at speed</h2>
        <ol className="space-y-2" data-testid="brief-headlines">
          {brief.sessions.map((x, i) => {
            const { headline, speed } = briefHeadline(x.summary);
            return (
              <li key={`${x.name}-${i}`} className="border-l-4 pl-3" style={{ borderColor: SESSION_COLOURS[i % SESSION_COLOURS.length] }}>
                <p className="text-sm text-ink-soft">
                  {x.name}
                  {x.sessionDate ? ` · ${x.sessionDate}` : ""}
                </p>
                <p className="font-medium" data-testid="brief-headline">{headline}</p>
                {speed && <p className="text-xs text-ink-soft">From the fastest speed band with a balance: {speed}.</p>}
              </li>
            );
          })}
        </ol>
      </section>
      <section className="rounded border border-rule bg-panel px-4 py-3">
        <UPlotChart
          title="Balance against speed, every session (% of the aero load on the front axle, 95 % whiskers)"
          fileName="brief-comparison-balance"
          optionsKey={`brief-comparison-${brief.sessions.length}`}
          options={options}
          data={overlay.cols as ChartData}
          fallback={
            <ScrollRegion label="Balance per band and session">
              <table className="num w-full text-sm">
                <thead>
                  <tr>
                    <th scope="col" className="text-right font-medium">Band mid km/h</th>
                    {brief.sessions.map((x, i) => <th key={i} scope="col" className="text-right font-medium">{x.name}: % front</th>)}
                  </tr>
                </thead>
                <tbody>
                  {overlay.xs.map((v, r) => (
                    <tr key={v}>
                      <td className="text-right">{fmt(v, 0)}</td>
                      {brief.sessions.map((_, i) => <td key={i} className="text-right">{fmt(overlay.cols[i + 1][r], 1)}</td>)}
                    </tr>
                  ))}
                </tbody>
              </table>
            </ScrollRegion>
          }
        />
      </section>
      <Caution />
      <p className="text-xs text-ink-faint">
        This link is read-only and works until {brief.expiresAt.slice(0, 10)}. It shows these {brief.sessions.length} sessions and nothing else of the team.
      </p>
    </main>
  );
}

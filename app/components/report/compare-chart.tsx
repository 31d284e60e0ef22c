/** Compare's overlay: balance (solid, left axis) and understeer gradient (dashed, right axis) per band, one colour per session. */
import { useMemo } from "react";
import type uPlot from "uplot";
import { UPlotChart, type ChartData } from "~/components/charts/uplot-chart";
import { fmt, type CompareBand } from "~/lib/report/compare";

export const SESSION_COLOURS = ["#16181d", "#3a4fb8", "#8a5a00", "#6b7180", "#7a2e8f", "#1d6b4f", "#9b1c1c", "#474c57"];

const axis = (label: string, side?: number, scale?: string): uPlot.Axis => ({ label, side, scale, stroke: "#474c57", grid: { show: side === undefined, stroke: "#eceef1" }, font: "11px ui-sans-serif, system-ui", labelFont: "11px ui-sans-serif, system-ui", labelSize: 18 });

export function CompareChart({ sessions }: { sessions: { id: string; name: string; bands: CompareBand[] }[] }) {
  const { data, options, key } = useMemo(() => {
    // One x column: every band's mid-point (km/h), so sessions with the same bands line up.
    const xs = [...new Set(sessions.flatMap((s) => s.bands.map((b) => (b.min_kmh + b.max_kmh) / 2)))].sort((a, b) => a - b);
    const at = (s: (typeof sessions)[number], pick: (b: CompareBand) => number | null) => xs.map((x) => { const b = s.bands.find((c) => (c.min_kmh + c.max_kmh) / 2 === x); return b ? pick(b) : null; });
    const series: uPlot.Series[] = [{ label: "Band mid km/h" }];
    const cols: (number | null)[][] = [xs];
    sessions.forEach((s, i) => {
      const stroke = SESSION_COLOURS[i % SESSION_COLOURS.length];
      series.push({ label: `${s.name}: balance %`, stroke, width: 2, spanGaps: true, scale: "bal", points: { show: true, size: 7, fill: "#fff", stroke } });
      cols.push(at(s, (b) => b.balance_front_pct));
      series.push({ label: `${s.name}: understeer deg/g`, stroke, width: 1.5, dash: [5, 4], spanGaps: true, scale: "us", points: { show: true, size: 5, fill: stroke, stroke } });
      cols.push(at(s, (b) => b.understeer_gradient_deg_per_g));
    });
    return {
      data: cols as ChartData,
      key: sessions.map((s) => s.id).join(","),
      options: { series, scales: { x: { time: false } }, axes: [axis("Speed band mid km/h"), axis("Balance % front (solid)", 3, "bal"), axis("Understeer deg/g (dashed)", 1, "us")] } as Omit<uPlot.Options, "width" | "height">,
    };
  }, [sessions]);
  return (
    <UPlotChart
      title="Balance and understeer gradient per band, all sessions"
      fileName="compare-overlay"
      optionsKey={key}
      options={options}
      data={data}
      height={280}
      fallback={<p className="text-xs text-ink-soft">The table below holds every plotted value ({fmt(sessions.length, 0)} sessions).</p>}
    />
  );
}

/** The Balance report's charts (uPlot, client only) with their server-rendered fallback tables. */
import { useEffect, useMemo, useState, type ReactNode } from "react";
import { useFetcher } from "react-router";
import type uPlot from "uplot";
import type { SessionSummary } from "~/engine/summary-types";
import { UPlotChart, type ChartData } from "~/components/charts/uplot-chart";
import { whiskerHook } from "~/components/charts/whiskers";
import { aeroLoadChart, bandPointChart, rangeWithIntervals, rideHeightChart, rideHeightMapChart, traceMid } from "~/lib/report/chart-data";
import { fmt } from "~/lib/report/format";

export const FRONT = "#b4532a";
export const REAR = "#2f6f8f";
const GREY = "#474c57";
const FAINT = "#9aa0ab";

const axis = (label: string): uPlot.Axis => ({ label, stroke: GREY, grid: { stroke: "#eceef1", width: 1 }, ticks: { stroke: "#d9dbe0", width: 1 }, font: "11px ui-sans-serif, system-ui", labelFont: "11px ui-sans-serif, system-ui", labelSize: 18 });
const points = (stroke: string, label: string, scale = "y"): uPlot.Series => ({ label, stroke, fill: "#fff", width: 0, scale, paths: () => null, points: { show: true, size: 8, stroke, fill: "#fff", width: 2 } });
const line = (stroke: string, label: string, dash?: number[]): uPlot.Series => ({ label, stroke, width: 1.5, dash, spanGaps: true, points: { show: false } });
const lineWithPoints = (stroke: string, label: string, dash?: number[]): uPlot.Series => ({ label, stroke, width: 1.5, dash, spanGaps: true, points: { show: true, size: 6, stroke, fill: "#fff" } });
/** A fixed y range that keeps every whisker in view. */
function yRange(values: (number | null)[], intervals: ([number, number] | null)[]): uPlot.Scale {
  const r = rangeWithIntervals(values, intervals);
  return r ? { range: () => r } : {};
}
const xSpeed: uPlot.Series = { label: "Speed km/h", value: (_u, v) => (v === null ? "—" : `${fmt(v, 0)} km/h`) };

function FallbackTable({ head, rows }: { head: string[]; rows: (string | number)[][] }) {
  return (
    <table className="num w-full text-xs">
      <thead>
        <tr>{head.map((h) => <th key={h} scope="col" className="px-1 text-right font-medium text-ink-soft">{h}</th>)}</tr>
      </thead>
      <tbody>
        {rows.map((r, i) => (
          <tr key={i}>{r.map((c, j) => <td key={j} className="px-1 text-right">{c}</td>)}</tr>
        ))}
      </tbody>
    </table>
  );
}

export function ReportCharts({ s, sessionId, teamSlug }: { s: SessionSummary; sessionId: string; teamSlug: string }) {
  const load = useMemo(() => aeroLoadChart(s), [s]);
  const balance = useMemo(() => bandPointChart(s, (b) => b.balance_front_pct, (b) => b.balance_front_ci95_pct), [s]);
  const understeer = useMemo(() => bandPointChart(s, (b) => b.understeer_gradient_deg_per_g, (b) => b.understeer_ci95_deg_per_g), [s]);
  const rh = useMemo(() => rideHeightChart(s), [s]);
  const rhMap = useMemo(() => rideHeightMapChart(s), [s]);
  const bandRows = s.bands.filter((b) => b.mean_speed_kmh !== null);

  const loadOpts = useMemo<Omit<uPlot.Options, "width" | "height">>(() => ({
    series: [xSpeed, line(FRONT, "Front ½ρv²·ClA"), line(REAR, "Rear ½ρv²·ClA"), points(FRONT, "Front band"), points(REAR, "Rear band")],
    axes: [axis("Speed km/h"), axis("Aero load N")],
    scales: { x: { time: false } },
    hooks: { draw: [whiskerHook(load.intervals, { 3: FRONT, 4: REAR })] },
  }), [load]);
  const balanceOpts = useMemo<Omit<uPlot.Options, "width" | "height">>(() => ({
    series: [xSpeed, points(GREY, "Balance % front")],
    axes: [axis("Speed km/h"), axis("Balance % front")],
    scales: { x: { time: false }, y: yRange(balance.data[1], balance.intervals[1]) },
    hooks: { draw: [whiskerHook(balance.intervals, { 1: GREY })] },
  }), [balance]);
  const usOpts = useMemo<Omit<uPlot.Options, "width" | "height">>(() => ({
    series: [xSpeed, points(GREY, "Understeer gradient deg/g")],
    axes: [axis("Speed km/h"), axis("Understeer deg/g")],
    scales: { x: { time: false }, y: yRange(understeer.data[1], understeer.intervals[1]) },
    hooks: { draw: [whiskerHook(understeer.intervals, { 1: GREY })] },
  }), [understeer]);
  const rhLabel = rh.absolute ? "Ride height mm" : "Change from static mm";
  const rhOpts = useMemo<Omit<uPlot.Options, "width" | "height">>(() => ({
    series: [xSpeed, lineWithPoints(FRONT, "Front"), lineWithPoints(REAR, "Rear"), lineWithPoints(GREY, "Rake", [4, 3])],
    axes: [axis("Speed km/h"), axis(rhLabel)],
    scales: { x: { time: false } },
  }), [rhLabel]);
  const mapOpts = useMemo<Omit<uPlot.Options, "width" | "height">>(() => ({
    series: [{ label: "Front ride-height change mm" }, lineWithPoints(GREY, "Balance % front")],
    axes: [axis("Front ride-height change mm (nose down ←)"), axis("Balance % front")],
    scales: { x: { time: false } },
  }), []);

  return (
    <div className="grid grid-cols-1 gap-4 lg:grid-cols-2" data-testid="report-charts">
      <UPlotChart
        title="Aero load per axle against speed"
        fileName={`aero-load-${sessionId}`}
        optionsKey={`load-${sessionId}`}
        options={loadOpts}
        data={load.data as ChartData}
        fallback={<FallbackTable head={["km/h", "front N", "rear N"]} rows={bandRows.map((b) => [fmt(b.mean_speed_kmh, 0), fmt(b.aero_load_front_n, 0), fmt(b.aero_load_rear_n, 0)])} />}
      />
      <UPlotChart
        title="Balance against speed (95 % whiskers)"
        fileName={`balance-${sessionId}`}
        optionsKey={`balance-${sessionId}`}
        options={balanceOpts}
        data={balance.data as ChartData}
        fallback={<FallbackTable head={["km/h", "% front"]} rows={bandRows.map((b) => [fmt(b.mean_speed_kmh, 0), fmt(b.balance_front_pct, 1)])} />}
      />
      <UPlotChart
        title="Understeer gradient per band (95 % whiskers)"
        fileName={`understeer-${sessionId}`}
        optionsKey={`us-${sessionId}`}
        options={usOpts}
        data={understeer.data as ChartData}
        fallback={<FallbackTable head={["km/h", "deg/g"]} rows={bandRows.map((b) => [fmt(b.mean_speed_kmh, 0), fmt(b.understeer_gradient_deg_per_g, 2)])} />}
      />
      <UPlotChart
        title={rh.absolute ? "Ride height and rake against speed" : "Ride-height change and rake against speed (from the dampers)"}
        fileName={`ride-height-${sessionId}`}
        optionsKey={`rh-${sessionId}-${rh.absolute}`}
        options={rhOpts}
        data={rh.data as ChartData}
        fallback={<FallbackTable head={["km/h", "front mm", "rear mm", "rake mm"]} rows={rh.data[0].map((x, i) => [fmt(x, 0), fmt(rh.data[1][i], 1), fmt(rh.data[2][i], 1), fmt(rh.data[3][i], 1)])} />}
      />
      <UPlotChart
        title="Balance against front ride height (Ride-height map)"
        fileName={`ride-height-map-${sessionId}`}
        optionsKey={`map-${sessionId}`}
        options={mapOpts}
        data={rhMap.data as ChartData}
        fallback={<FallbackTable head={["front mm", "% front", "samples"]} rows={rhMap.data[0].map((x, i) => [fmt(x, 1), fmt(rhMap.data[1][i], 1), rhMap.samples[i]])} />}
      />
      <ClientOnly fallback={<p className="text-sm text-ink-soft lg:col-span-2">The stint's traces are drawn in the browser.</p>}>
        <TraceCharts sessionId={sessionId} teamSlug={teamSlug} />
      </ClientOnly>
    </div>
  );
}

/** Children that exist only in the browser (fetched data, no server HTML to match). */
function ClientOnly({ children, fallback }: { children: ReactNode; fallback: ReactNode }) {
  const [mounted, setMounted] = useState(false);
  useEffect(() => setMounted(true), []);
  return mounted ? children : fallback;
}

type Traces = { t_s: number[]; channels: Record<string, { min: (number | null)[]; max: (number | null)[] }> };

/** The stint's decimated traces, fetched from the data API, three charts with one shared cursor. */
function TraceCharts({ sessionId, teamSlug }: { sessionId: string; teamSlug: string }) {
  const fetcher = useFetcher<Traces | { error: string }>();
  useEffect(() => {
    fetcher.load(`/api/sessions/${encodeURIComponent(sessionId)}/traces?team=${encodeURIComponent(teamSlug)}`);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [sessionId, teamSlug]);
  const answer = fetcher.data;
  const traces = answer && "t_s" in answer ? answer : null;
  const error = answer && "error" in answer ? answer.error : null;
  const cols = useMemo(() => {
    if (!traces) return null;
    const n = traces.t_s.length;
    const mid = (name: string) => traceMid(traces.channels[name], n);
    return {
      speed: [traces.t_s, mid("speed_kmh")] as ChartData,
      lat: [traces.t_s, mid("lat_accel_g")] as ChartData,
      dampers: [traces.t_s, mid("damper_fl_mm"), mid("damper_fr_mm"), mid("damper_rl_mm"), mid("damper_rr_mm")] as ChartData,
    };
  }, [traces]);
  const sync = { key: `stint-${sessionId}`, setSeries: false };
  const xTime: uPlot.Series = { label: "Time s", value: (_u, v) => (v === null ? "—" : `${fmt(v, 1)} s`) };
  const opts = useMemo(() => ({
    speed: { series: [xTime, line(GREY, "Speed km/h")], axes: [axis("Time s"), axis("km/h")], scales: { x: { time: false } }, cursor: { sync } },
    lat: { series: [xTime, line(GREY, "Lateral g")], axes: [axis("Time s"), axis("g")], scales: { x: { time: false } }, cursor: { sync } },
    dampers: {
      series: [xTime, line(FRONT, "FL mm"), line(FRONT, "FR mm", [4, 3]), line(REAR, "RL mm"), line(REAR, "RR mm", [4, 3])],
      axes: [axis("Time s"), axis("Damper mm")],
      scales: { x: { time: false } },
      cursor: { sync },
    },
  }), [sessionId]); // eslint-disable-line react-hooks/exhaustive-deps
  const loading = <span className="block text-sm text-ink-soft">{error ? `Traces not available: ${error}` : "Loading the stint’s traces…"}</span>;
  const note = <span className="block text-xs text-ink-soft">Traces are drawn in the browser from the data API.</span>;
  return (
    <div className="min-w-0 space-y-2 lg:col-span-2" data-testid="trace-charts">
      <UPlotChart title="Speed over the stint" fileName={`speed-${sessionId}`} optionsKey={`tr-speed-${sessionId}`} options={opts.speed} data={cols?.speed ?? null} height={150} loading={loading} fallback={note} />
      <UPlotChart title="Lateral acceleration" fileName={`lat-g-${sessionId}`} optionsKey={`tr-lat-${sessionId}`} options={opts.lat} data={cols?.lat ?? null} height={150} fallback={note} />
      <UPlotChart title="Damper travel" fileName={`dampers-${sessionId}`} optionsKey={`tr-dampers-${sessionId}`} options={opts.dampers} data={cols?.dampers ?? null} height={180} fallback={note} />
    </div>
  );
}

/**
 * A small uPlot chart of one column over the first minutes of a log: the lowest and highest value of
 * each bucket, so spikes survive the decimation. uPlot is imperative: created once in an effect,
 * given new data with setData, resized from a ResizeObserver, destroyed on cleanup.
 */
import { useEffect, useRef } from "react";
import type uPlot from "uplot";
import "uplot/dist/uPlot.min.css";

export interface PreviewSeries {
  /** Seconds from the start of the log (or row numbers when the time unit is unknown). */
  xs: ArrayLike<number>;
  min: ArrayLike<number>;
  max: ArrayLike<number>;
}

const HEIGHT = 84;

function columns(s: PreviewSeries): uPlot.AlignedData {
  const gap = (v: number) => (Number.isFinite(v) ? v : null);
  return [Array.from(s.xs), Array.from(s.min, gap), Array.from(s.max, gap)] as uPlot.AlignedData;
}

export function PreviewChart({ series, colour, label }: { series: PreviewSeries; colour: string; label: string }) {
  const box = useRef<HTMLDivElement>(null);
  const chart = useRef<uPlot | null>(null);
  const latest = useRef(series);
  latest.current = series;

  useEffect(() => {
    let cancelled = false;
    let observer: ResizeObserver | null = null;
    let timer: ReturnType<typeof setTimeout> | undefined;
    // Each chart is drawn in a task of its own (a dozen charts in one task would hold the page up).
    void import("uplot").then(({ default: UPlot }) => (timer = setTimeout(() => create(UPlot), 0)));
    const create = (UPlot: typeof uPlot) => {
      if (cancelled || !box.current) return;
      const width = Math.max(120, box.current.clientWidth);
      const line = { stroke: colour, width: 1, points: { show: false } };
      chart.current = new UPlot(
        {
          width,
          height: HEIGHT,
          legend: { show: false },
          cursor: { show: false },
          scales: { x: { time: false } },
          axes: [
            { size: 22, font: "10px JetBrains Mono, monospace", stroke: "#6b7180", grid: { stroke: "#eceef1" }, ticks: { show: false } },
            { size: 46, font: "10px JetBrains Mono, monospace", stroke: "#6b7180", grid: { stroke: "#eceef1" }, ticks: { show: false } },
          ],
          series: [{}, { ...line, label: "min" }, { ...line, label: "max" }],
          bands: [{ series: [2, 1], fill: `${colour}33` }],
        },
        columns(latest.current),
        box.current,
      );
      observer = new ResizeObserver(() => {
        if (box.current && chart.current) chart.current.setSize({ width: Math.max(120, box.current.clientWidth), height: HEIGHT });
      });
      observer.observe(box.current);
    };
    return () => {
      cancelled = true;
      clearTimeout(timer);
      observer?.disconnect();
      chart.current?.destroy();
      chart.current = null;
    };
  }, [colour]);

  useEffect(() => {
    chart.current?.setData(columns(series));
  }, [series]);

  return <div ref={box} className="h-[84px] w-full min-w-0" role="img" aria-label={label} />;
}

/**
 * The one uPlot wrapper: the chart is created once per set of options, fed with setData when the
 * data changes, sized by a ResizeObserver and destroyed on unmount. It runs in the browser only;
 * until then (and for screen readers after) the server-rendered `fallback` table stands in.
 * `data-draw-ms` on the figure holds the time from the data arriving to the first draw.
 */
import { useEffect, useRef, useState, type ReactNode } from "react";
import type uPlot from "uplot";
import "uplot/dist/uPlot.min.css";

export type ChartData = uPlot.AlignedData;

export interface UPlotChartProps {
  /** Options without width/height (the container decides them). Changing `optionsKey` recreates the chart. */
  options: Omit<uPlot.Options, "width" | "height">;
  optionsKey: string;
  data: ChartData | null;
  height?: number;
  title: string;
  /** File name (without extension) for the PNG. */
  fileName: string;
  fallback: ReactNode;
  /** Shown while data is null. */
  loading?: ReactNode;
}

/** The chart's canvas on white, as a PNG download. */
export function savePng(u: uPlot, fileName: string) {
  const src = u.ctx.canvas;
  const out = document.createElement("canvas");
  out.width = src.width;
  out.height = src.height;
  const ctx = out.getContext("2d")!;
  ctx.fillStyle = "#ffffff";
  ctx.fillRect(0, 0, out.width, out.height);
  ctx.drawImage(src, 0, 0);
  out.toBlob((blob) => {
    if (!blob) return;
    const a = document.createElement("a");
    a.href = URL.createObjectURL(blob);
    a.download = `${fileName}.png`;
    document.body.append(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(a.href), 1000);
  }, "image/png");
}

export function UPlotChart({ options, optionsKey, data, height = 240, title, fileName, fallback, loading }: UPlotChartProps) {
  const holder = useRef<HTMLDivElement>(null);
  const figure = useRef<HTMLElement>(null);
  const chart = useRef<uPlot | null>(null);
  const dataArrived = useRef(0);
  const [ready, setReady] = useState(false);
  const latest = useRef(data);
  latest.current = data;

  // Create once per options; destroy on unmount or when the options change.
  useEffect(() => {
    let cancelled = false;
    let observer: ResizeObserver | null = null;
    (async () => {
      const { default: UPlot } = await import("uplot");
      if (cancelled || !holder.current) return;
      const width = Math.max(200, holder.current.clientWidth);
      dataArrived.current = latest.current ? performance.now() : 0;
      const u = new UPlot(
        {
          ...options,
          width,
          height,
          hooks: {
            ...options.hooks,
            draw: [
              ...(options.hooks?.draw ?? []),
              () => {
                if (dataArrived.current && figure.current) {
                  figure.current.dataset.drawMs = (performance.now() - dataArrived.current).toFixed(1);
                  dataArrived.current = 0;
                }
              },
            ],
          },
        },
        latest.current ?? (options.series.map(() => []) as unknown as ChartData),
        holder.current,
      );
      chart.current = u;
      setReady(true);
      observer = new ResizeObserver((entries) => {
        const w = Math.floor(entries[0].contentRect.width);
        if (w > 0 && Math.abs(w - u.width) > 1) u.setSize({ width: w, height });
      });
      observer.observe(holder.current);
    })();
    return () => {
      cancelled = true;
      observer?.disconnect();
      chart.current?.destroy();
      chart.current = null;
      setReady(false);
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [optionsKey, height]);

  // New data: setData on the chart we have.
  useEffect(() => {
    if (!chart.current || !data) return;
    dataArrived.current = performance.now();
    chart.current.setData(data);
  }, [data, ready]);

  const drawn = ready && data !== null;
  return (
    <figure ref={figure} className="min-w-0" data-chart-title={title} data-drawn={drawn ? "yes" : "no"}>
      <figcaption className="mb-1 flex items-center justify-between gap-2 text-sm font-medium">
        <span>{title}</span>
        <button
          type="button"
          className="rounded border border-rule px-2 py-0.5 text-xs font-normal text-ink-soft hover:bg-rule-soft disabled:opacity-50 print:hidden"
          disabled={!drawn}
          onClick={() => chart.current && savePng(chart.current, fileName)}
        >
          Save PNG
        </button>
      </figcaption>
      {!data && loading}
      <div ref={holder} className="w-full overflow-hidden" />
      <div className={ready ? "sr-only" : "overflow-x-auto"}>{fallback}</div>
    </figure>
  );
}

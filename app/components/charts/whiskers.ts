/**
 * A uPlot draw hook for intervals: a vertical whisker with caps at each point that has one. `intervals[s]`
 * is aligned with the x values of series s (null where a point has no interval).
 */
import type uPlot from "uplot";

export type Intervals = Record<number, ([number, number] | null)[]>;

export function whiskerHook(intervals: Intervals, colours: Record<number, string>) {
  return (u: uPlot) => {
    const ctx = u.ctx;
    const xs = u.data[0];
    ctx.save();
    ctx.lineWidth = Math.max(1, devicePixelRatio);
    const cap = 4 * devicePixelRatio;
    for (const [key, list] of Object.entries(intervals)) {
      const s = Number(key);
      const series = u.series[s];
      if (!series || series.show === false) continue;
      const scale = series.scale ?? "y";
      ctx.strokeStyle = colours[s] ?? "#474c57";
      list.forEach((ci, i) => {
        if (!ci || xs[i] === null || xs[i] === undefined) return;
        const x = u.valToPos(xs[i] as number, "x", true);
        const y0 = u.valToPos(ci[0], scale, true);
        const y1 = u.valToPos(ci[1], scale, true);
        ctx.beginPath();
        ctx.moveTo(x, y0);
        ctx.lineTo(x, y1);
        ctx.moveTo(x - cap, y0);
        ctx.lineTo(x + cap, y0);
        ctx.moveTo(x - cap, y1);
        ctx.lineTo(x + cap, y1);
        ctx.stroke();
      });
    }
    ctx.restore();
  };
}

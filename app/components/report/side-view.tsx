import type { SessionSummary } from "~/engine/summary-types";
import { sideViewGeometry } from "~/lib/report/side-view";
import { bandLabel } from "~/lib/report/format";

const WIDTH = 560;
const PAD = 56;
const GROUND = 150;
const WHEEL_R = 22;

/** The CoG as the engineering quartered circle. */
function CogSymbol({ x, y, r = 8 }: { x: number; y: number; r?: number }) {
  return (
    <g data-symbol="cog">
      <circle cx={x} cy={y} r={r} fill="#fff" stroke="#16181d" strokeWidth={1.3} />
      <path d={`M ${x} ${y} L ${x} ${y - r} A ${r} ${r} 0 0 1 ${x + r} ${y} Z`} fill="#16181d" />
      <path d={`M ${x} ${y} L ${x} ${y + r} A ${r} ${r} 0 0 1 ${x - r} ${y} Z`} fill="#16181d" />
    </g>
  );
}

/** A CoP as a hollow triangle pointing down, its tip on the line it marks. */
function CopSymbol({ x, y, shade, size = 8 }: { x: number; y: number; shade: string; size?: number }) {
  return <path data-symbol="cop" d={`M ${x} ${y} L ${x - size * 0.8} ${y - size * 1.4} L ${x + size * 0.8} ${y - size * 1.4} Z`} fill="#fff" stroke={shade} strokeWidth={1.6} />;
}

/**
 * Plain side view of the car: front axle left, the CoG, and the CoP of each speed band with a
 * balance (slow bands light, fast bands dark), and a dimension line in mm from the CoG to the
 * fastest band's CoP.
 */
export function SideView({ summary, id }: { summary: Pick<SessionSummary, "car" | "cop" | "bands">; id?: string }) {
  const withCop = summary.bands.filter((b) => b.cop_from_front_axle_mm !== null);
  const g = sideViewGeometry({
    wheelbaseMm: summary.car.wheelbase_mm,
    cogFromFrontMm: summary.cop.cog_from_front_axle_mm,
    cops: withCop.map((b) => ({ key: bandLabel(b), label: `${bandLabel(b)} km/h`, copFromFrontMm: b.cop_from_front_axle_mm })),
    widthPx: WIDTH,
    padPx: PAD,
  });
  const bodyTop = GROUND - 70;
  const copY = GROUND - 58;
  const cogY = GROUND - Math.min((summary.car.cog_height_mm ?? 350) * g.scale, 60);
  const shades = g.cops.map((_, i) => {
    const t = g.cops.length > 1 ? i / (g.cops.length - 1) : 1;
    const light = Math.round(170 - 150 * t);
    return `rgb(${light},${light},${light + 10})`;
  });
  const label = g.dimension
    ? `Side view: CoG ${Math.round(summary.cop.cog_from_front_axle_mm)} mm behind the front axle; the fastest band's CoP ${g.dimension.label}`
    : `Side view: CoG ${Math.round(summary.cop.cog_from_front_axle_mm)} mm behind the front axle; no band has a CoP`;
  return (
    <figure id={id}>
      <svg viewBox={`0 0 ${WIDTH} ${GROUND + 60}`} role="img" aria-label={label} className="w-full" data-chart="side-view">
        <line x1={6} y1={GROUND} x2={WIDTH - 6} y2={GROUND} stroke="#6b7180" strokeWidth={1} />
        <path
          d={`M ${g.frontAxleX - 44} ${GROUND - 22} L ${g.frontAxleX - 30} ${bodyTop + 20} L ${g.frontAxleX + 60} ${bodyTop + 8} L ${g.cogX - 10} ${bodyTop - 14} L ${g.rearAxleX - 40} ${bodyTop - 8} L ${g.rearAxleX + 40} ${bodyTop + 2} L ${g.rearAxleX + 44} ${GROUND - 24} Z`}
          fill="none"
          stroke="#474c57"
          strokeWidth={1.2}
        />
        <circle cx={g.frontAxleX} cy={GROUND - WHEEL_R} r={WHEEL_R} fill="#fff" stroke="#b4532a" strokeWidth={2.5} />
        <circle cx={g.rearAxleX} cy={GROUND - WHEEL_R} r={WHEEL_R} fill="#fff" stroke="#2f6f8f" strokeWidth={2.5} />
        <text x={g.frontAxleX} y={GROUND + 16} textAnchor="middle" fontSize={11} fill="#b4532a">front</text>
        <text x={g.rearAxleX} y={GROUND + 16} textAnchor="middle" fontSize={11} fill="#2f6f8f">rear</text>
        <line x1={g.frontAxleX} y1={copY} x2={g.rearAxleX} y2={copY} stroke="#d9dbe0" strokeDasharray="3 3" />
        {g.cops.map((c, i) => (
          <g key={c.key}>
            <title>{`${c.label}: CoP ${Math.round(c.copFromFrontMm)} mm behind the front axle, ${Math.abs(Math.round(c.behindCogMm))} mm ${c.behindCogMm >= 0 ? "behind" : "ahead of"} the CoG${c.outside ? " (off the wheelbase)" : ""}`}</title>
            <CopSymbol x={c.x} y={copY} shade={shades[i]} />
          </g>
        ))}
        {g.cops.length > 0 && (
          <text x={g.cops[g.cops.length - 1].x} y={copY - 16} textAnchor="middle" fontSize={10} fill="#474c57">
            {g.cops[g.cops.length - 1].label}
          </text>
        )}
        <CogSymbol x={g.cogX} y={cogY} />
        {g.dimension && (
          <g stroke="#16181d" strokeWidth={1}>
            <line x1={g.dimension.x1} y1={GROUND + 30} x2={g.dimension.x2} y2={GROUND + 30} />
            <line x1={g.dimension.x1} y1={GROUND + 24} x2={g.dimension.x1} y2={GROUND + 36} />
            <line x1={g.dimension.x2} y1={GROUND + 24} x2={g.dimension.x2} y2={GROUND + 36} />
            <line x1={g.cogX} y1={cogY + 8} x2={g.cogX} y2={GROUND + 24} strokeDasharray="2 3" stroke="#6b7180" />
          </g>
        )}
        {g.dimension && (
          <text x={(g.dimension.x1 + g.dimension.x2) / 2} y={GROUND + 50} textAnchor="middle" fontSize={12} className="num" fill="#16181d">
            CoP {g.dimension.label}
          </text>
        )}
      </svg>
      <figcaption className="mt-1 text-xs text-ink-soft">
        Quartered circle: CoG. Hollow triangles: the CoP of each speed band, slow (light) to fast (dark). Dimension line: CoG to the fastest band's CoP.
      </figcaption>
    </figure>
  );
}

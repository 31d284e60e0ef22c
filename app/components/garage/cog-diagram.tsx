/**
 * Plain side view: front axle left, rear axle right, the CoG as the engineering quartered circle at
 * its distance behind the front axle and its height, with the distance as a dimension line in mm.
 */
export function CogDiagram({ wheelbaseMm, cogFromFrontMm, cogHeightMm }: { wheelbaseMm: number; cogFromFrontMm: number; cogHeightMm: number }) {
  const width = 320;
  const pad = 30;
  const scale = (width - 2 * pad) / wheelbaseMm;
  const ground = 110;
  const wheelR = 16;
  const x = pad + cogFromFrontMm * scale;
  const y = ground - Math.min(cogHeightMm * scale, ground - 12);
  const r = 7;
  return (
    <svg viewBox={`0 0 ${width} 140`} role="img" aria-label={`CoG ${cogFromFrontMm.toFixed(0)} mm behind the front axle, ${cogHeightMm.toFixed(0)} mm high`} className="w-full max-w-sm">
      <line x1={8} y1={ground} x2={width - 8} y2={ground} stroke="#6b7180" strokeWidth={1} />
      <path d={`M ${pad - 18} ${ground - 20} L ${pad + 20} ${ground - 42} L ${width - pad - 10} ${ground - 46} L ${width - pad + 18} ${ground - 22} Z`} fill="none" stroke="#474c57" strokeWidth={1.2} />
      <circle cx={pad} cy={ground - wheelR} r={wheelR} fill="none" stroke="#b4532a" strokeWidth={2} />
      <circle cx={width - pad} cy={ground - wheelR} r={wheelR} fill="none" stroke="#2f6f8f" strokeWidth={2} />
      <g aria-hidden>
        <circle cx={x} cy={y} r={r} fill="#fff" stroke="#16181d" strokeWidth={1.2} />
        <path d={`M ${x} ${y} L ${x} ${y - r} A ${r} ${r} 0 0 1 ${x + r} ${y} Z`} fill="#16181d" />
        <path d={`M ${x} ${y} L ${x} ${y + r} A ${r} ${r} 0 0 1 ${x - r} ${y} Z`} fill="#16181d" />
      </g>
      <g stroke="#474c57" strokeWidth={1}>
        <line x1={pad} y1={ground + 14} x2={x} y2={ground + 14} />
        <line x1={pad} y1={ground + 9} x2={pad} y2={ground + 19} />
        <line x1={x} y1={ground + 9} x2={x} y2={ground + 19} />
      </g>
      <text x={(pad + x) / 2} y={ground + 28} textAnchor="middle" className="num" fontSize={11} fill="#16181d">
        {cogFromFrontMm.toFixed(0)} mm
      </text>
    </svg>
  );
}

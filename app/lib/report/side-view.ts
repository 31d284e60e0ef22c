/**
 * Side-view geometry: the CoG and each band's CoP placed on the wheelbase (front axle at the left),
 * and the dimension line between the CoG and one CoP in mm. Pure numbers, drawn by SideView.
 */
export interface SideViewInput {
  wheelbaseMm: number;
  cogFromFrontMm: number;
  cops: { key: string; label: string; copFromFrontMm: number | null }[];
  /** The CoP the dimension line runs to (usually the fastest band with a balance). */
  dimensionKey?: string;
  widthPx: number;
  padPx: number;
}

export interface SideViewGeometry {
  /** px per mm. */
  scale: number;
  frontAxleX: number;
  rearAxleX: number;
  cogX: number;
  cops: { key: string; label: string; x: number; copFromFrontMm: number; behindCogMm: number; outside: boolean }[];
  dimension: { x1: number; x2: number; mm: number; behind: boolean; label: string } | null;
}

export function sideViewGeometry(i: SideViewInput): SideViewGeometry {
  const scale = (i.widthPx - 2 * i.padPx) / i.wheelbaseMm;
  const xOf = (mm: number) => i.padPx + mm * scale;
  // A CoP off the wheelbase is drawn at the drawing's edge and marked as such.
  const minMm = -i.padPx / scale;
  const maxMm = i.wheelbaseMm + i.padPx / scale;
  const cops = i.cops
    .filter((c): c is typeof c & { copFromFrontMm: number } => c.copFromFrontMm !== null)
    .map((c) => {
      const clamped = Math.min(maxMm, Math.max(minMm, c.copFromFrontMm));
      return { key: c.key, label: c.label, x: xOf(clamped), copFromFrontMm: c.copFromFrontMm, behindCogMm: c.copFromFrontMm - i.cogFromFrontMm, outside: clamped !== c.copFromFrontMm };
    });
  const target = cops.find((c) => c.key === i.dimensionKey) ?? cops[cops.length - 1];
  const cogX = xOf(i.cogFromFrontMm);
  const dimension = target
    ? {
        x1: Math.min(cogX, target.x),
        x2: Math.max(cogX, target.x),
        mm: Math.abs(target.behindCogMm),
        behind: target.behindCogMm >= 0,
        label: `${Math.abs(Math.round(target.behindCogMm))} mm ${target.behindCogMm >= 0 ? "behind" : "ahead of"} CoG`,
      }
    : null;
  return { scale, frontAxleX: xOf(0), rearAxleX: xOf(i.wheelbaseMm), cogX, cops, dimension };
}

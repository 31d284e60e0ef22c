/**
 * The static damper reference learned from slow running, when the car file gives no static readings,
 * and the bump-stop contact share that depends on it.
 *
 * Slow running is not unloaded: at 45–60 km/h the aero already puts a few tens of newtons on each
 * wheel, a few tenths of a millimetre of damper travel, and that is the size of the margin by which
 * a damper at speed clears or touches its bump stop. While streaming, the mean slow-running reading
 * places contact for the load model. At the end, once the fit knows ClA per axle, the aero part of
 * that mean is taken out (aero load = ClA·q, common practice; spread evenly over the axle's two
 * wheels, an approximation): x_static = mean(x) − ClA_axle·mean(q) / (2·Ks·MR).
 *
 * The contact share is kept as a histogram of each axle's margin (the more compressed wheel's travel
 * from the streaming reference, less the gap), so the share can be read off for the corrected
 * reference at the end. All state here is plain data: it crosses threads when a log is analysed in parts.
 */
/** Sums layout: 0–3 Σx per corner (FL, FR, RL, RR), 4 Σq. */
export const STATIC_SUMS = 5;

export function addStaticSample(s: Float64Array, q: number, xfl: number, xfr: number, xrl: number, xrr: number): void {
  s[0] += xfl; s[1] += xfr; s[2] += xrl; s[3] += xrr; s[4] += q;
}

/** Mean slow-running reading per corner into `out` (FL, FR, RL, RR); NaN when n is 0. */
export function staticEstimate(s: ArrayLike<number>, n: number, out: Float64Array): void {
  for (let c = 0; c < 4; c++) out[c] = n > 0 ? s[c] / n : NaN;
}

/** Damper travel (mm) by which the slow-running mean reads compressed from aero load, per axle. */
export function aeroTravelAtEstimateMm(s: ArrayLike<number>, n: number, claFrontM2: number, claRearM2: number, forcePerMmFront: number, forcePerMmRear: number): { front: number; rear: number } {
  const q = n > 0 ? s[4] / n : NaN;
  const travel = (cla: number, k: number) => (Number.isFinite(cla) && cla > 0 && k > 0 && q >= 0 ? (cla * q) / 2 / k : 0);
  return { front: travel(claFrontM2, forcePerMmFront), rear: travel(claRearM2, forcePerMmRear) };
}

/** Contact-margin histogram: bins of 0.02 mm over ±10 mm, plus one below and one above. */
export const CONTACT_BIN_MM = 0.02;
export const CONTACT_LO_MM = -10;
export const CONTACT_BINS = 1000;
const BINS_PER_MM = 1 / CONTACT_BIN_MM;
/** Slots per axle: an underflow bin, CONTACT_BINS bins, an overflow bin. */
export const CONTACT_SLOTS = CONTACT_BINS + 2;

/** Histogram slot of a margin (mm): 0 underflow, 1 … CONTACT_BINS, CONTACT_BINS + 1 overflow. */
export function contactSlot(marginMm: number): number {
  const b = Math.floor((marginMm - CONTACT_LO_MM) * BINS_PER_MM);
  return b < 0 ? 0 : b >= CONTACT_BINS ? CONTACT_BINS + 1 : b + 1;
}

/**
 * Share (%) of the histogram's rows in contact once the reference moves `shiftMm` towards
 * extension (margins grow by it): a bin counts when its centre is past the gap.
 */
export function contactSharePct(hist: Float64Array, offset: number, shiftMm: number): number {
  let all = 0, touch = 0;
  for (let i = 0; i < CONTACT_SLOTS; i++) {
    const n = hist[offset + i];
    if (n === 0) continue;
    all += n;
    const centre = i === 0 ? -Infinity : i === CONTACT_BINS + 1 ? Infinity : CONTACT_LO_MM + (i - 0.5) * CONTACT_BIN_MM;
    if (centre + shiftMm > 0) touch += n;
  }
  return all > 0 ? (100 * touch) / all : NaN;
}

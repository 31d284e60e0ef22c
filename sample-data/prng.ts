/** Seeded PRNG (mulberry32) and Gaussian noise, so every generated log is reproducible. */
export class Prng {
  private s: number;
  private spare = NaN;
  constructor(seed: number) {
    this.s = seed >>> 0;
  }
  next(): number {
    let t = (this.s = (this.s + 0x6d2b79f5) >>> 0);
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }
  gauss(): number {
    if (this.spare === this.spare) {
      const v = this.spare;
      this.spare = NaN;
      return v;
    }
    let u = 0;
    while (u === 0) u = this.next();
    const v = this.next();
    const r = Math.sqrt(-2 * Math.log(u));
    this.spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  }
}

/**
 * Band-limited noise: white noise through a two-pole resonator at `hz` (pole radius 0.9), scaled to
 * the given RMS. Stands in for road input at the wheels.
 */
export function resonantNoise(rng: Prng, n: number, rateHz: number, hz: number, rms: number): Float64Array {
  const out = new Float64Array(n);
  const w = (2 * Math.PI * Math.min(hz, rateHz * 0.4)) / rateHz;
  const r = 0.9;
  const a1 = 2 * r * Math.cos(w), a2 = -r * r;
  let y1 = 0, y2 = 0, ss = 0;
  for (let i = 0; i < n; i++) {
    const y = a1 * y1 + a2 * y2 + rng.gauss();
    out[i] = y;
    ss += y * y;
    y2 = y1;
    y1 = y;
  }
  const k = n > 0 && ss > 0 ? rms / Math.sqrt(ss / n) : 0;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += out[i];
  mean /= n || 1;
  for (let i = 0; i < n; i++) out[i] = (out[i] - mean) * k;
  return out;
}

import { describe, expect, it } from "vitest";
import { addStaticSample, aeroTravelAtEstimateMm, CONTACT_BIN_MM, CONTACT_SLOTS, contactSharePct, contactSlot, STATIC_SUMS, staticEstimate } from "~/engine/static-estimate";

describe("static reference sums", () => {
  it("the estimate is the mean slow-running reading per corner", () => {
    const s = new Float64Array(STATIC_SUMS);
    addStaticSample(s, 100, 30.1, 31.1, 40.2, 41.2);
    addStaticSample(s, 120, 29.9, 30.9, 39.8, 40.8);
    const out = new Float64Array(4);
    staticEstimate(s, 2, out);
    [30, 31, 40, 41].forEach((x, c) => expect(out[c]).toBeCloseTo(x, 12));
    staticEstimate(s, 0, out);
    expect(Array.from(out).every(Number.isNaN)).toBe(true);
  });

  it("aero travel at the estimate's speed: ClA·q̄ / 2 wheels / (Ks·MR)", () => {
    // F = ClA·q (common practice) and ΔFw = Ks·MR·Δx (Barton & Fieldhouse, Automotive Chassis
    // Engineering §3.9): ClA 0.45 m² at q̄ = 96 Pa on a 100 N/mm spring with MR 0.95 → 0.227 mm.
    const s = new Float64Array(STATIC_SUMS);
    addStaticSample(s, 90, 0, 0, 0, 0);
    addStaticSample(s, 102, 0, 0, 0, 0);
    const d = aeroTravelAtEstimateMm(s, 2, 0.45, 0.75, 100 * 0.95, 120 * 0.9);
    expect(d.front).toBeCloseTo((0.45 * 96) / 2 / 95, 12);
    expect(d.rear).toBeCloseTo((0.75 * 96) / 2 / 108, 12);
    // No fit (NaN), lift (negative ClA) or no samples: nothing is taken out.
    expect(aeroTravelAtEstimateMm(s, 2, NaN, -0.1, 95, 108)).toEqual({ front: 0, rear: 0 });
    expect(aeroTravelAtEstimateMm(s, 0, 0.45, 0.75, 95, 108)).toEqual({ front: 0, rear: 0 });
  });
});

describe("bump-stop contact histogram", () => {
  const histOf = (margins: number[]) => {
    const h = new Float64Array(2 * CONTACT_SLOTS);
    for (const m of margins) h[contactSlot(m)]++;
    return h;
  };

  it("counts a margin past the gap as contact, and moves with the reference", () => {
    // Margins (mm past the gap): 2 of 8 in contact; moving the static reference 0.25 mm towards
    // extension adds 0.25 mm to every margin, bringing −0.2 and −0.1 into contact.
    const h = histOf([-3, -1, -0.5, -0.3, -0.2, -0.1, 0.1, 0.5]);
    expect(contactSharePct(h, 0, 0)).toBeCloseTo(25, 12);
    expect(contactSharePct(h, 0, 0.25)).toBeCloseTo(50, 12);
    expect(contactSharePct(h, 0, -0.2)).toBeCloseTo(12.5, 12);
  });

  it("keeps far margins in the end slots and an empty axle as NaN", () => {
    expect(contactSlot(-Infinity)).toBe(0);
    expect(contactSlot(-50)).toBe(0);
    expect(contactSlot(50)).toBe(CONTACT_SLOTS - 1);
    expect(contactSlot(0.5 * CONTACT_BIN_MM)).toBe(contactSlot(0));
    const h = histOf([-40, 40]);
    expect(contactSharePct(h, 0, 5)).toBeCloseTo(50, 12);
    expect(contactSharePct(h, CONTACT_SLOTS, 0)).toBeNaN();
  });
});

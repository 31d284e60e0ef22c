import fc from "fast-check";
import { linearRegression, linearRegressionLine } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { fitLine, fitThroughOriginArrays, LineAccumulator, solveNormalEquations } from "~/engine/regression";

// NIST Statistical Reference Datasets, linear regression, "Norris" (36 observations, y then x).
// https://www.itl.nist.gov/div898/strd/lls/data/Norris.shtml
const NORRIS: [number, number][] = [
  [0.1, 0.2], [338.8, 337.4], [118.1, 118.2], [888.0, 884.6], [9.2, 10.1], [228.1, 226.5],
  [668.5, 666.3], [998.5, 996.3], [449.1, 448.6], [778.9, 777.0], [559.2, 558.2], [0.3, 0.4],
  [0.1, 0.6], [778.1, 775.5], [668.8, 666.9], [339.3, 338.0], [448.9, 447.5], [10.8, 11.6],
  [557.7, 556.0], [228.3, 228.1], [998.0, 995.8], [888.8, 887.6], [119.6, 120.2], [0.3, 0.3],
  [0.6, 0.3], [557.6, 556.8], [339.3, 339.1], [888.0, 887.2], [998.5, 999.0], [778.9, 779.0],
  [10.2, 11.1], [117.6, 118.3], [228.9, 229.2], [668.4, 669.1], [449.2, 448.9], [0.2, 0.5],
];

describe("least squares against NIST StRD", () => {
  it("Norris: B0 −0.262323073774029, B1 1.00211681802045, R² 0.999993745883712", () => {
    // Certified values, NIST StRD Norris (lower difficulty, 36 observations).
    expect(NORRIS).toHaveLength(36);
    const fit = fitLine(NORRIS.map((p) => p[1]), NORRIS.map((p) => p[0]))!;
    expect(fit.intercept).toBeCloseTo(-0.262323073774029, 10);
    expect(fit.slope).toBeCloseTo(1.00211681802045, 12);
    expect(fit.r2).toBeCloseTo(0.999993745883712, 12);
    // Certified standard deviations, NIST StRD Norris (from memory): sd(B0) 0.232818234301152, sd(B1) 0.429796848199937E-03.
    expect(fit.intercept_se).toBeCloseTo(0.232818234301152, 8);
    expect(fit.slope_se).toBeCloseTo(0.000429796848199937, 10);
  });

  it("Norris through the normal-equation solver gives the same certified coefficients", () => {
    // NIST StRD Norris certified B0, B1 again, via the small multiple-regression path.
    let n = 0, sx = 0, sxx = 0, sy = 0, sxy = 0, syy = 0;
    for (const [y, x] of NORRIS) { n++; sx += x; sxx += x * x; sy += y; sxy += x * y; syy += y * y; }
    const fit = solveNormalEquations([n, sx, sx, sxx], [sy, sxy], syy, n, 2)!;
    expect(fit.beta[0]).toBeCloseTo(-0.262323073774029, 6);
    expect(fit.beta[1]).toBeCloseTo(1.00211681802045, 9);
  });

  it("NoInt1 (through the origin, x = 60…70, y = 130…140): B1 2.07438016528926", () => {
    // NIST StRD NoInt1 certified value. https://www.itl.nist.gov/div898/strd/lls/data/NoInt1.shtml
    const x = Array.from({ length: 11 }, (_, i) => 60 + i);
    const y = Array.from({ length: 11 }, (_, i) => 130 + i);
    const fit = fitThroughOriginArrays(x, y)!;
    expect(fit.slope).toBeCloseTo(2.07438016528926, 12);
    // Certified sd(B1) 0.165289256198347E-01 and residual SD 3.56753034006338 (from memory).
    expect(fit.slope_se).toBeCloseTo(0.0165289256198347, 10);
    expect(fit.residual_sd).toBeCloseTo(3.56753034006338, 9);
    const viaSolver = solveNormalEquations([x.reduce((a, v) => a + v * v, 0)], [x.reduce((a, v, i) => a + v * y[i], 0)], y.reduce((a, v) => a + v * v, 0), 11, 1)!;
    expect(viaSolver.beta[0]).toBeCloseTo(2.07438016528926, 12);
  });
});

describe("least squares against simple-statistics (independent reference library)", () => {
  it("streaming accumulator equals simple-statistics linearRegression on random data", () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: -1e4, max: 1e4, noNaN: true }), fc.double({ min: -1e4, max: 1e4, noNaN: true })), { minLength: 3, maxLength: 200 }),
        (pts) => {
          const xs = pts.map((p) => p[0]);
          const spread = Math.max(...xs) - Math.min(...xs);
          fc.pre(spread > 1e-3);
          const acc = new LineAccumulator();
          for (const [x, y] of pts) acc.add(x, y);
          const mine = acc.fit()!;
          const ref = linearRegression(pts);
          const line = linearRegressionLine(ref);
          // Compare predictions over the data range: scale-free and well conditioned.
          for (const x of [Math.min(...xs), Math.max(...xs)]) {
            const want = line(x);
            const got = mine.intercept + mine.slope * x;
            expect(Math.abs(got - want)).toBeLessThanOrEqual(1e-6 * (1 + Math.abs(want)) + 1e-9 * Math.max(...pts.map((p) => Math.abs(p[1]))));
          }
        },
      ),
      { numRuns: 300, seed: 20261201 },
    );
  });
});

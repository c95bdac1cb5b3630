import { describe, expect, it } from "vitest";
import { regularizedGammaP, regularizedGammaQ } from "@shared/stats/distributions";
import { logisticRegression } from "@shared/stats";
import { brentRoot } from "@shared/stats/roots";

describe("numerical routines say when they did not converge", () => {
  it("Brent's method returns NaN, not its last iterate, when it runs out of iterations", () => {
    // x^3 - 2 has its root at 2^(1/3) (exact value); two iterations cannot reach 1e-12.
    expect(brentRoot((x) => x ** 3 - 2, 0, 2, 1e-12, 2)).toBeNaN();
    expect(brentRoot((x) => x ** 3 - 2, 0, 2)).toBeCloseTo(Math.cbrt(2), 12);
  });

  it("the incomplete gamma series returns NaN when 100,000 terms do not settle it", () => {
    // For a = x = 1e12 the series needs about sqrt(a) = 1e6 terms (Abramowitz & Stegun 6.5.29; from memory).
    expect(regularizedGammaP(1e12, 1e12 - 10)).toBeNaN();
    // An ordinary value still converges: P(1, 1) = 1 - e^-1 (exponential distribution, exact).
    expect(regularizedGammaP(1, 1)).toBeCloseTo(1 - Math.exp(-1), 14);
    expect(regularizedGammaQ(1, 3)).toBeCloseTo(Math.exp(-3), 14);
  });

  it("Firth's fit stops as converged on a flat penalized likelihood instead of running to its iteration limit", () => {
    // Quasi-complete separation with a flat ridge: a 0/1 predictor whose "1" rows all died.
    const x = [[1], [1], [1], [1], [0], [0], [0], [0], [0], [0]];
    const y = [1, 1, 1, 1, 1, 0, 0, 1, 0, 0];
    const fit = logisticRegression(x, y, { firth: true });
    expect(fit.converged).toBe(true);
    expect(fit.iterations).toBeLessThan(200);
    // Firth's estimate for a single 0/1 predictor equals the Haldane-corrected log odds ratio
    // (docs/sources.md section 5): ln((4.5 x 4.5) / (0.5 x 2.5)).
    expect(fit.coefficients[1].estimate).toBeCloseTo(Math.log((4.5 * 4.5) / (0.5 * 2.5)), 6);
  });

  it("Firth's profile refits carry their convergence to the result: an unconverged profile reports no interval", () => {
    // The same separated table: the profile interval of the slope needs refits with the slope held
    // fixed; one iteration each cannot converge, so the interval and p-value are not reported.
    const x = [[1], [1], [1], [1], [0], [0], [0], [0], [0], [0]];
    const y = [1, 1, 1, 1, 1, 0, 0, 1, 0, 0];
    const starved = logisticRegression(x, y, { firth: true, firthIntervals: "profile", profileMaxIterations: 1, terms: [{ name: "x", columns: [0] }] });
    expect(starved.converged).toBe(true); // the Firth fit itself converged
    expect(starved.profileConverged).toBe(false);
    expect(starved.coefficients[1].profileConverged).toBe(false);
    expect(starved.coefficients[1].ci.every(Number.isNaN)).toBe(true);
    expect(starved.coefficients[1].pValue).toBeNaN();
    expect(starved.terms![0].chiSquare).toBeNaN();
    // The estimate itself does not depend on the refits: still the Haldane-corrected log odds ratio (docs/sources.md section 5).
    expect(starved.coefficients[1].estimate).toBeCloseTo(Math.log((4.5 * 4.5) / (0.5 * 2.5)), 6);
    // With the default budget every refit converges and the interval is finite and holds the estimate.
    const full = logisticRegression(x, y, { firth: true, firthIntervals: "profile" });
    expect(full.profileConverged).toBe(true);
    expect(full.coefficients[1].profileConverged).toBe(true);
    const [low, high] = full.coefficients[1].ci;
    expect(low).toBeLessThan(full.coefficients[1].estimate);
    expect(high).toBeGreaterThan(full.coefficients[1].estimate);
  });
});

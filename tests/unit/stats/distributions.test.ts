import jStat from "jstat";
import { describe, expect, it } from "vitest";
import {
  chiSquareUpperTail,
  erfc,
  logFactorialTable,
  logGamma,
  normalCdf,
  normalQuantile,
  normalTwoSidedP,
  normalUpperTail,
  studentTTwoSidedP,
  twoSidedCriticalValue,
} from "@shared/stats/distributions";
import { createUniformSource } from "@shared/stats/random";
import { expectAbsoluteClose, expectRelativeClose } from "./helpers";

describe("standard normal and chi-square reference points", () => {
  it("reproduces the tabulated 95% points", () => {
    // z(0.975) = 1.959964 and chi-square(1 df, 0.95) = 3.841459: Abramowitz & Stegun 1964, tables
    // 26.1 and 26.8 (from memory); digits below agree with mpmath 1.3 at 40 digits (COMPUTED).
    expectRelativeClose(normalQuantile(0.975), 1.959963984540054, 1e-14);
    expectRelativeClose(twoSidedCriticalValue(0.95), 1.959963984540054, 1e-14);
    expectRelativeClose(normalCdf(1.96), 0.9750021048517796, 1e-14);
    expectRelativeClose(chiSquareUpperTail(3.841458820694124, 1), 0.05, 1e-12);
    // SAS Breslow-Day output for the Chinese smoking data: 5.200 on 7 df, p = 0.636 (Agresti 2002
    // Table 3.3 via the Stanford ED257 handout, docs/sources.md section 3).
    expectAbsoluteClose(chiSquareUpperTail(5.2, 7), 0.636, 5e-4);
  });
});

describe("far tails keep their relative precision", () => {
  it("computes upper tails directly instead of 1 - cdf", () => {
    // mpmath 1.3 ncdf / erfc / gammainc at 40 digits (COMPUTED).
    expectRelativeClose(normalUpperTail(10), 7.61985302416053e-24, 1e-12);
    expectRelativeClose(normalUpperTail(37), 5.72557122252458e-300, 1e-11);
    expectRelativeClose(normalTwoSidedP(10), 2 * 7.61985302416053e-24, 1e-12);
    expectRelativeClose(erfc(5), 1.537459794428035e-12, 1e-13);
    // 5.237048923789256e-319 is subnormal: a double holds only about 5 of its digits there.
    expectRelativeClose(erfc(27), 5.23705e-319, 1e-5);
    expectRelativeClose(chiSquareUpperTail(200, 10), 1.6139305336977305e-37, 1e-11);
    expectRelativeClose(normalQuantile(1e-10), -6.361340902404056, 1e-13);
  });

  it("keeps the lower half consistent with the upper tail", () => {
    for (const z of [-3, -0.5, 0, 0.7, 2.2]) expectAbsoluteClose(normalCdf(z) + normalUpperTail(z), 1, 1e-15);
  });
});

describe("log-gamma and log-factorials", () => {
  it("matches exact values", () => {
    // ln Gamma(1/2) = ln sqrt(pi) and ln Gamma(11) = ln 10! = ln 3628800 are exact identities (common practice, no source).
    expectRelativeClose(logGamma(0.5), 0.5 * Math.log(Math.PI), 1e-15);
    expectRelativeClose(logGamma(11), Math.log(3628800), 1e-15);
    // ln(1,000,000!) = ln Gamma(1,000,001) = 12815518.38465817, mpmath 1.3 loggamma (COMPUTED).
    expectRelativeClose(logGamma(1_000_001), 12815518.38465817, 1e-15);
  });

  it("builds a log-factorial table that agrees with log-gamma far out", () => {
    const table = logFactorialTable(1_000_000);
    // mpmath 1.3 loggamma(1000001) (COMPUTED); Kahan summation keeps the table within ~1e-9.
    expectAbsoluteClose(table[1_000_000], 12815518.38465817, 1e-7);
    expectAbsoluteClose(table[5000], logGamma(5001), 1e-9);
  });
});

describe("Student t", () => {
  it("gives two-sided p-values", () => {
    // scipy 1.17 stats.t.sf(2.5, 7) * 2 and stats.t.sf(40, 5) * 2 (COMPUTED).
    expectRelativeClose(studentTTwoSidedP(2.5, 7), 0.04099221858575297, 1e-12);
    expectRelativeClose(studentTTwoSidedP(40, 5), 1.8411962171772954e-7, 1e-9);
    expect(studentTTwoSidedP(0, 12)).toBe(1);
  });
});

describe("cross-checks against jstat on seeded random inputs", () => {
  const random = createUniformSource(20240611);

  it("normal cdf", () => {
    for (let i = 0; i < 200; i++) {
      const z = (random() - 0.5) * 12;
      expectAbsoluteClose(normalCdf(z), jStat.normal.cdf(z, 0, 1), 1e-13);
    }
  });

  it("normal quantile", () => {
    for (let i = 0; i < 200; i++) {
      const p = 0.001 + random() * 0.998;
      expectAbsoluteClose(normalQuantile(p), jStat.normal.inv(p, 0, 1), 1e-8);
    }
  });

  it("chi-square upper tail", () => {
    for (let i = 0; i < 200; i++) {
      const df = 1 + Math.floor(random() * 30);
      const x = random() * 3 * df;
      expectAbsoluteClose(chiSquareUpperTail(x, df), 1 - jStat.chisquare.cdf(x, df), 1e-10);
    }
  });
});

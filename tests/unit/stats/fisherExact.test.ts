import jStat from "jstat";
import { describe, expect, it } from "vitest";
import { fisherExact } from "@shared/stats/fisherExact";
import { createUniformSource } from "@shared/stats/random";
import { expectAbsoluteClose, expectRelativeClose } from "./helpers";

// Published worked example: Fisher's tea-tasting experiment, R fisher.test help example
// (Agresti 2002 p. 91): guesses (rows milk, tea) against truth (columns milk, tea).
const TEA: number[][] = [
  [3, 1],
  [1, 3],
];

describe("tea tasting (R fisher.test example; Agresti 2002 p. 91)", () => {
  it("one-sided test, conditional MLE and one-sided interval", () => {
    const result = fisherExact(TEA, { alternative: "greater" });
    expectAbsoluteClose(result.pValue, 0.2429, 5e-5); // R example output "p = 0.2429"
    expectRelativeClose(result.pValue, 17 / 70, 1e-12); // null probabilities 1/70 + 16/70 (docs/sources.md section 1, COMPUTED)
    expectRelativeClose(result.oddsRatio!, 6.408309, 1e-5); // R output, conditional MLE
    expectRelativeClose(result.ci![0], 0.3135693, 1e-4); // R output, one-sided 95% CI lower limit
    expect(result.ci![1]).toBe(Infinity); // R output "0.3135693 Inf"
    expect(result.method).toBe("exact-2x2");
  });

  it("two-sided p = 34/70 and the less-than p", () => {
    expectRelativeClose(fisherExact(TEA).pValue, 34 / 70, 1e-12); // docs/sources.md section 1: scipy and full enumeration (COMPUTED)
    expectAbsoluteClose(fisherExact(TEA, { alternative: "less" }).pValue, 0.9857, 5e-5); // docs/sources.md section 1 (COMPUTED)
  });

  it("two-sided exact interval", () => {
    const { ci } = fisherExact(TEA);
    expectAbsoluteClose(ci![0], 0.2117, 5e-5); // docs/sources.md section 1, scipy (COMPUTED)
    // 626.24 from scipy (COMPUTED); the note there says the upper limit is sensitive to the root
    // finder's tolerance (R-like solvers give ~622-626), so only 1% is asked.
    expectRelativeClose(ci![1], 626.24, 1e-2);
  });
});

// Fisher (1962, 1970): convictions of like-sex twins of criminals, R fisher.test help example.
const CONVICTIONS: number[][] = [
  [2, 15],
  [10, 3],
];

describe("convictions of twins (Fisher 1962; R fisher.test example)", () => {
  it("p-values and conditional MLE", () => {
    expectAbsoluteClose(fisherExact(CONVICTIONS, { alternative: "less" }).pValue, 0.0004652, 5e-8); // R output
    const twoSided = fisherExact(CONVICTIONS);
    expectAbsoluteClose(twoSided.pValue, 0.0005367, 5e-8); // R output
    expectRelativeClose(twoSided.oddsRatio!, 0.04693661, 1e-5); // R output
  });

  it("exact 95% and 99% intervals", () => {
    const ci95 = fisherExact(CONVICTIONS).ci!;
    // R output 0.003325764 - 0.363182271; R's uniroot tolerance moves the small lower limit in the
    // 3rd digit, so 1e-2 there (docs/sources.md section 1).
    expectRelativeClose(ci95[0], 0.003325764, 1e-2);
    expectRelativeClose(ci95[1], 0.363182271, 1e-4);
    // scipy contingency.odds_ratio(kind="conditional"): 0.0033172 - 0.3631896 (docs/sources.md section 1, COMPUTED).
    expectRelativeClose(ci95[0], 0.0033172, 1e-4);
    expectRelativeClose(ci95[1], 0.3631896, 1e-5);
    const ci99 = fisherExact(CONVICTIONS, { level: 0.99 }).ci!;
    expectRelativeClose(ci99[0], 0.001386333, 2e-2); // R output; lower limit limited by uniroot as above
    expectRelativeClose(ci99[1], 0.578851645, 1e-5); // R output
    expectRelativeClose(ci99[0], 0.0013719, 1e-4); // scipy (docs/sources.md section 1, COMPUTED)
  });

  it("one-sided interval for alternative less", () => {
    const { ci } = fisherExact(CONVICTIONS, { alternative: "less" });
    expect(ci![0]).toBe(0);
    expectRelativeClose(ci![1], 0.2849601, 1e-5); // R output "0 - 0.2849601"
  });
});

describe("zero cell", () => {
  it("gives an infinite conditional MLE with a finite lower limit", () => {
    const result = fisherExact([
      [10, 0],
      [5, 5],
    ]);
    expectAbsoluteClose(result.pValue, 0.032508, 5e-7); // docs/sources.md section 2 (COMPUTED)
    expect(result.oddsRatio).toBe(Infinity); // docs/sources.md section 2: conditional MLE is infinite (COMPUTED)
    expectAbsoluteClose(result.ci![0], 1.195, 5e-4); // docs/sources.md section 2 (COMPUTED)
    expect(result.ci![1]).toBe(Infinity);
  });

  it("reports no odds ratio when a margin is empty (the table is fixed by its margins)", () => {
    const result = fisherExact([
      [0, 0],
      [4, 6],
    ]);
    expect(result.pValue).toBe(1);
    expect(Number.isNaN(result.oddsRatio)).toBe(true);
    expect(result.ci).toEqual([0, Infinity]);
  });
});

describe("r x c tables (Freeman-Halton)", () => {
  it("job satisfaction 4x4 (Agresti 2002 p. 57; R fisher.test example)", () => {
    const job = [
      [1, 3, 10, 6],
      [2, 3, 10, 7],
      [1, 6, 14, 12],
      [0, 1, 9, 11],
    ];
    const result = fisherExact(job);
    expect(result.method).toBe("exact-rxc");
    expectAbsoluteClose(result.pValue, 0.7827, 5e-5); // R output "# 0.7827"
    expectAbsoluteClose(result.pValue, 0.7826849, 5e-7); // full enumeration in C (docs/sources.md section 1, COMPUTED)
    expect(result.oddsRatio).toBeUndefined();
    expect(result.ci).toBeUndefined();
  });

  it("Mehta & Patel's 5x7 example (R fisher.test example MP6)", () => {
    const mp6 = [
      [1, 2, 2, 1, 1, 0, 1],
      [2, 0, 0, 2, 3, 0, 0],
      [0, 1, 1, 1, 2, 7, 3],
      [1, 1, 2, 0, 0, 0, 1],
      [0, 1, 1, 1, 1, 0, 0],
    ];
    const result = fisherExact(mp6);
    expect(result.method).toBe("exact-rxc");
    expectAbsoluteClose(result.pValue, 0.03929, 5e-6); // R output
  });

  it("Monte Carlo estimate agrees with the exact p-value and is reproducible from its seed", () => {
    const job = [
      [1, 3, 10, 6],
      [2, 3, 10, 7],
      [1, 6, 14, 12],
      [0, 1, 9, 11],
    ];
    const simulated = fisherExact(job, { rxcMethod: "monte-carlo", replicates: 20000, seed: 7 });
    expect(simulated.method).toBe("monte-carlo-rxc");
    expect(simulated.monteCarlo).toMatchObject({ replicates: 20000, seed: 7 });
    // R with simulate.p.value = TRUE, B = 1e5 reports 0.7842 (docs/sources.md section 1); the exact value is
    // 0.7826849. Allow four Monte Carlo standard errors around the exact value.
    expect(Math.abs(simulated.pValue - 0.7826849)).toBeLessThan(4 * simulated.monteCarlo!.standardError);
    const again = fisherExact(job, { rxcMethod: "monte-carlo", replicates: 20000, seed: 7 });
    expect(again.pValue).toBe(simulated.pValue);
    const otherSeed = fisherExact(job, { rxcMethod: "monte-carlo", replicates: 20000, seed: 8 });
    expect(otherSeed.pValue).not.toBe(simulated.pValue);
  });

  it("switches to Monte Carlo for a 6x2 table of 5,000 taxa and says so", () => {
    // Invented counts: six trait states, extinct and survived.
    const sixStates = [
      [400, 420],
      [380, 450],
      [410, 400],
      [390, 430],
      [420, 400],
      [405, 395],
    ];
    const auto = fisherExact(sixStates);
    expect(auto.method).toBe("monte-carlo-rxc");
    expect(auto.monteCarlo!.replicates).toBe(100_000);
    expect(auto.monteCarlo!.seed).toBe(1);
    // Derived check, no published value: the full enumeration of the same table, run on request.
    const exact = fisherExact(sixStates, { rxcMethod: "exact" });
    expect(exact.method).toBe("exact-rxc");
    expect(Math.abs(auto.pValue - exact.pValue)).toBeLessThan(4 * auto.monteCarlo!.standardError);
    // Large-sample sanity (common practice, no source): Pearson's chi-square on 5 df, via jstat.
    const rows = sixStates.map((r) => r[0] + r[1]);
    const columns = [0, 1].map((j) => sixStates.reduce((s, r) => s + r[j], 0));
    const n = rows.reduce((s, v) => s + v, 0);
    let pearson = 0;
    sixStates.forEach((r, i) => r.forEach((v, j) => (pearson += (v - (rows[i] * columns[j]) / n) ** 2 / ((rows[i] * columns[j]) / n))));
    expectAbsoluteClose(exact.pValue, 1 - jStat.chisquare.cdf(pearson, 5), 0.01);
  });

  it("drops empty rows and columns, which change no probability", () => {
    const withEmpty = fisherExact([
      [1, 0, 3, 10],
      [0, 0, 0, 0],
      [2, 0, 3, 10],
      [1, 0, 6, 14],
    ]);
    const without = fisherExact([
      [1, 3, 10],
      [2, 3, 10],
      [1, 6, 14],
    ]);
    expectRelativeClose(withEmpty.pValue, without.pValue, 1e-12);
  });
});

describe("tables with up to a million taxa", () => {
  it("gives a finite p in [0, 1] that matches the chi-square approximation", () => {
    const table = [
      [250500, 249500],
      [249500, 250500],
    ];
    const result = fisherExact(table);
    expect(result.pValue).toBeGreaterThan(0);
    expect(result.pValue).toBeLessThan(1);
    // Yates-corrected chi-square (ad - bc = 5e8, n = 1e6), p from jstat: for n this large Fisher's
    // p and the corrected chi-square agree closely (common practice, no source).
    const n = 1e6;
    const yates = (n * (Math.abs(250500 * 250500 - 249500 * 249500) - n / 2) ** 2) / (5e5 * 5e5 * 5e5 * 5e5);
    const chiSquareP = 1 - jStat.chisquare.cdf(yates, 1);
    expect(Math.abs(Math.log(result.pValue / chiSquareP))).toBeLessThan(0.01);
    // The conditional MLE approaches the sample odds ratio for large n (common practice, no source).
    expectRelativeClose(result.oddsRatio!, (250500 * 250500) / (249500 * 249500), 1e-4);
  });

  it("keeps ln p where p itself underflows", () => {
    const result = fisherExact([
      [260000, 240000],
      [240000, 260000],
    ]);
    expect(result.pValue).toBe(0);
    expect(Number.isFinite(result.logPValue)).toBe(true);
    // Normal approximation: X^2 = 1600, so z = 40 and ln(2 * upper tail) ~ -z^2/2 - ln z - ln sqrt(2 pi) + ln 2
    // (Mills' ratio; common practice, no source).
    const z = 40;
    const normalLog = (-z * z) / 2 - Math.log(z) - 0.5 * Math.log(2 * Math.PI) + Math.log(2);
    expect(Math.abs(result.logPValue! - normalLog)).toBeLessThan(1);
    expect(result.ci![0]).toBeLessThan(result.oddsRatio!);
    expect(result.ci![1]).toBeGreaterThan(result.oddsRatio!);
  });
});

describe("agrees with summing jStat's hypergeometric pmf over the whole support", () => {
  // The test sums only the terms that matter, starting at the mode; summing every term of
  // jStat.hypgeom.pdf by brute force must give the same p-values, MLE and interval.
  const random = createUniformSource(97531);
  const tables: number[][][] = [
    [
      [700, 900],
      [950, 650],
    ], // far tail: p about 1e-18
    [
      [12, 380],
      [30, 410],
    ], // skewed margins
  ];
  for (let i = 0; i < 6; i++) {
    const cell = (): number => 20 + Math.floor(random() * 400);
    tables.push([
      [cell(), cell()],
      [cell(), cell()],
    ]);
  }

  it.each(tables.map((table) => [JSON.stringify(table), table] as const))("%s", (_label, table) => {
    const [[a, b], [c, d]] = table;
    const total = a + b + c + d;
    const firstColumn = a + c;
    const firstRow = a + b;
    const lo = Math.max(0, firstRow - (total - firstColumn));
    const hi = Math.min(firstRow, firstColumn);
    const values: number[] = [];
    const logPmf: number[] = [];
    for (let x = lo; x <= hi; x++) {
      values.push(x);
      logPmf.push(Math.log(jStat.hypgeom.pdf(x, total, firstColumn, firstRow)));
    }
    const observed = logPmf[a - lo];
    const sumWhere = (keep: (x: number, logP: number) => boolean): number =>
      logPmf.reduce((sum, logP, i) => (keep(values[i], logP) ? sum + Math.exp(logP) : sum), 0);
    // R's fisher.test rule: values no more likely than the observed one, relative tolerance 1e-7.
    expectRelativeClose(fisherExact(table).pValue, sumWhere((_x, logP) => logP <= observed + Math.log1p(1e-7)), 1e-9);
    expectRelativeClose(fisherExact(table, { alternative: "less" }).pValue, sumWhere((x) => x <= a), 1e-9);
    expectRelativeClose(fisherExact(table, { alternative: "greater" }).pValue, sumWhere((x) => x >= a), 1e-9);

    // Under the noncentral distribution tilted by the estimate, E[X] = a; at the lower limit
    // P(X >= a) = 0.025 and at the upper limit P(X <= a) = 0.025 (Cornfield 1956).
    const tilted = (psi: number): number[] => {
      const logs = logPmf.map((logP, i) => logP + values[i] * Math.log(psi));
      const max = Math.max(...logs);
      const weights = logs.map((l) => Math.exp(l - max));
      const sum = weights.reduce((s, w) => s + w, 0);
      return weights.map((w) => w / sum);
    };
    const result = fisherExact(table);
    const atEstimate = tilted(result.oddsRatio!);
    expectRelativeClose(
      atEstimate.reduce((s, p, i) => s + p * values[i], 0),
      a,
      1e-9,
    );
    expectRelativeClose(
      tilted(result.ci![0]).reduce((s, p, i) => (values[i] >= a ? s + p : s), 0),
      0.025,
      1e-6,
    );
    expectRelativeClose(
      tilted(result.ci![1]).reduce((s, p, i) => (values[i] <= a ? s + p : s), 0),
      0.025,
      1e-6,
    );
  });
});

describe("properties on seeded random tables", () => {
  const random = createUniformSource(424242);
  const randomTable = (): number[][] => [
    [Math.floor(random() * 30), Math.floor(random() * 30)],
    [Math.floor(random() * 30), Math.floor(random() * 30)],
  ];

  it("p-values lie in [0, 1]; two-sided p is never below the smaller one-sided p", () => {
    for (let i = 0; i < 200; i++) {
      const table = randomTable();
      if (table.flat().every((v) => v === 0)) continue;
      const two = fisherExact(table).pValue;
      const less = fisherExact(table, { alternative: "less" }).pValue;
      const greater = fisherExact(table, { alternative: "greater" }).pValue;
      for (const p of [two, less, greater]) {
        expect(p).toBeGreaterThanOrEqual(0);
        expect(p).toBeLessThanOrEqual(1);
      }
      expect(two).toBeGreaterThanOrEqual(Math.min(less, greater) * (1 - 1e-12));
      // One-sided tails overlap in the observed table, so they sum to at least 1.
      expect(less + greater).toBeGreaterThanOrEqual(1 - 1e-12);
    }
  });

  it("swapping rows inverts the odds ratio and its interval", () => {
    for (let i = 0; i < 100; i++) {
      const table = randomTable().map((row) => row.map((v) => v + 1));
      const original = fisherExact(table);
      const swapped = fisherExact([table[1], table[0]]);
      expectRelativeClose(swapped.oddsRatio!, 1 / original.oddsRatio!, 1e-8);
      expectRelativeClose(swapped.ci![0], 1 / original.ci![1], 1e-8);
      expectRelativeClose(swapped.ci![1], 1 / original.ci![0], 1e-8);
      expectRelativeClose(swapped.pValue, original.pValue, 1e-12);
    }
  });
});

describe("rejects impossible input", () => {
  it("names the offending cell or option", () => {
    expect(() => fisherExact([[1, 2], [-2, 3]])).toThrow("fisherExact: cell [1][0] is -2; counts must be non-negative integers");
    expect(() => fisherExact([[1, 2.5], [2, 3]])).toThrow("cell [0][1] is 2.5");
    expect(() => fisherExact([[1, NaN], [2, 3]])).toThrow("cell [0][1] is NaN");
    expect(() => fisherExact([[1, Infinity], [2, 3]])).toThrow("cell [0][1] is Infinity");
    expect(() => fisherExact([])).toThrow("fisherExact: the table is empty");
    expect(() => fisherExact([[0, 0], [0, 0]])).toThrow("all counts are 0");
    expect(() => fisherExact([[1, 2, 3]])).toThrow("1 row(s); it needs at least 2");
    expect(() => fisherExact([[1, 2], [3]])).toThrow("row 1 has 1 cells but row 0 has 2");
    expect(() => fisherExact([[1], [2]])).toThrow("1 column(s)");
    expect(() => fisherExact([[1, 2, 3], [4, 5, 6]], { alternative: "less" })).toThrow("exists only for 2x2 tables");
    expect(() => fisherExact(TEA, { level: 1.5 })).toThrow("level is 1.5");
    expect(() => fisherExact([[6e6, 0], [0, 6e6]])).toThrow("more than the 10000000");
  });
});

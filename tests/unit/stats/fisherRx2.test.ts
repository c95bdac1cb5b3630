import { describe, expect, it } from "vitest";
import { compactTable, freemanHaltonExact } from "@shared/stats/freemanHalton";
import { fisherRx2 } from "@shared/stats/fisherRx2";
import { fisherExact } from "@shared/stats";
import { logFactorialTable } from "@shared/stats/distributions";
import { createUniformSource } from "@shared/stats/random";
import { expectRelativeClose } from "./helpers";

/**
 * The slow obvious way: every table with the observed margins, one by one. A table is the number
 * of first-column taxa x_i in each row (sum fixed); P = prod C(n_i, x_i) / C(N, V); the two-sided
 * p-value sums P over the tables no more likely than the observed one (relative tolerance 1e-7, as
 * R's fisher.test; docs/sources.md section 1c).
 */
function enumerateRx2(cells: number[][]): { pValue: number; tables: number } {
  const sizes = cells.map((row) => row[0] + row[1]);
  const counts = cells.map((row) => row[0]);
  const N = sizes.reduce((a, v) => a + v, 0);
  const V = counts.reduce((a, v) => a + v, 0);
  const lf = logFactorialTable(N);
  const logChoose = (n: number, k: number) => lf[n] - lf[k] - lf[n - k];
  const observed = counts.reduce((s, x, i) => s + logChoose(sizes[i], x), 0);
  const cutoff = observed + Math.log1p(1e-7);
  const after = sizes.map((_, i) => sizes.slice(i + 1).reduce((a, v) => a + v, 0));
  let pValue = 0;
  let tables = 0;
  const walk = (i: number, need: number, score: number): void => {
    if (i === sizes.length) {
      tables++;
      if (score <= cutoff) pValue += Math.exp(score - logChoose(N, V));
      return;
    }
    for (let x = Math.max(0, need - after[i]); x <= Math.min(sizes[i], need); x++) walk(i + 1, need - x, score + logChoose(sizes[i], x));
  };
  walk(0, V, 0);
  return { pValue, tables };
}

/** An r x 2 table of `rows` states with sizes drawn unevenly (a few large, many small) and a risk per state. */
function inventedTable(random: () => number, rows: number, taxa: number): number[][] {
  const weights = Array.from({ length: rows }, () => Math.log(random()) ** 2);
  const total = weights.reduce((a, v) => a + v, 0);
  return weights.map((w) => {
    const n = Math.max(1, Math.round((w / total) * taxa));
    const risk = 0.15 + 0.6 * random();
    let extinct = 0;
    for (let t = 0; t < n; t++) if (random() < risk) extinct++;
    return [extinct, n - extinct];
  });
}

describe("fisherRx2: the network over rows for r x 2 tables", () => {
  it("gives R's fisher.test p-value of the tea-tasting table (34/70 two-sided; Agresti 1990)", () => {
    const result = fisherRx2(compactTable([[3, 1], [1, 3]]))!;
    expectRelativeClose(Math.exp(result.logPValue), 34 / 70, 1e-12); // R: p-value = 0.4857 (docs/sources.md section 1, Fisher's tea-tasting)
  });

  it("agrees with the full Freeman-Halton enumeration on random r x 2 and 2 x c tables (seeded)", () => {
    const random = createUniformSource(1983);
    for (let trial = 0; trial < 60; trial++) {
      const rows = 2 + Math.floor(random() * 5);
      const cells = Array.from({ length: rows }, () => [Math.floor(random() * 7), Math.floor(random() * 7)]);
      const table = trial % 2 === 0 ? cells : [cells.map((r) => r[0]), cells.map((r) => r[1])];
      const compact = compactTable(table);
      if (compact.rowTotals.length < 2 || compact.columnTotals.length < 2) continue;
      const network = fisherRx2(compact)!;
      const full = freemanHaltonExact(compact, Infinity)!;
      expectRelativeClose(Math.exp(network.logPValue), Math.exp(full.logPValue), 1e-9);
    }
  });

  it("agrees with every table enumerated one by one, however the rows are split between the walk and the listed completions", () => {
    // Derived check, no published value: the slow obvious enumeration above. A completion limit of 1
    // walks every row; 50 lists the last row or two; the default lists as many as fit.
    const random = createUniformSource(2024);
    let tablesSeen = 0;
    let smallest = 1;
    for (let trial = 0; trial < 25; trial++) {
      const cells = inventedTable(random, 4 + Math.floor(random() * 5), 40 + Math.floor(random() * 60));
      const compact = compactTable(cells);
      if (compact.rowTotals.length < 2 || compact.columnTotals.length < 2) continue;
      const slow = enumerateRx2(compact.columnTotals.length === 2 ? compact.cells : cells);
      tablesSeen += slow.tables;
      smallest = Math.min(smallest, slow.pValue);
      for (const completionLimit of [1, 50, undefined]) {
        const fast = fisherRx2(compact, 50_000_000, completionLimit)!;
        expectRelativeClose(Math.exp(fast.logPValue), slow.pValue, 1e-9);
      }
    }
    expect(tablesSeen).toBeGreaterThan(100_000);
    expect(smallest).toBeLessThan(0.001); // the set includes tables far in the tail
  });

  it("computes a 14 x 2 table of 353 taxa exactly, which the test used to simulate", () => {
    // Invented counts: 14 states of one trait, unevenly filled (extinct, survived).
    const fourteen = [
      [70, 130], [30, 30], [18, 12], [12, 8], [2, 8], [6, 2], [1, 6],
      [4, 1], [3, 1], [0, 3], [2, 0], [1, 1], [1, 0], [0, 1],
    ];
    const result = fisherExact(fourteen);
    expect(result.method).toBe("exact-rxc");
    // Reference environment: R 4.2.2, fisher.test(matrix(c(70,130, 30,30, ...), ncol = 2, byrow = TRUE),
    // workspace = 2e8)$p.value = 0.000690743331110323 (its network algorithm, FEXACT; run for this
    // invented table, not a published value).
    expectRelativeClose(result.pValue, 0.000690743331110323, 1e-8);
    // Derived checks: the network with every row walked (a different path through the same sum) and a
    // seeded Monte Carlo estimate over 200,000 random tables with these margins.
    const walked = fisherRx2(compactTable(fourteen), 200_000_000, 1)!;
    expectRelativeClose(result.pValue, Math.exp(walked.logPValue), 1e-9);
    const simulated = fisherExact(fourteen, { rxcMethod: "monte-carlo", replicates: 200_000, seed: 14 });
    expect(Math.abs(result.pValue - simulated.pValue)).toBeLessThan(4 * simulated.monteCarlo!.standardError);
    expect(result.pValue).toBeLessThan(0.01);
  });

  it("gives up (null) when the work would pass its limit, so the caller can simulate", () => {
    // Invented counts: 14 states of similar size, a strong effect (p far in the tail). R 4.2.2's
    // fisher.test gives up on this table too ("FEXACT error 7 ... LDSTP=18716850 is too small",
    // workspace = 2e8, after 32 s of CPU): exact work is out of reach here, not only for us.
    const sizes = [60, 45, 40, 35, 30, 28, 25, 22, 18, 15, 12, 10, 8, 5];
    const share = [0.3, 0.35, 0.5, 0.4, 0.55, 0.3, 0.6, 0.45, 0.7, 0.2, 0.5, 0.8, 0.25, 0.6];
    const cells = sizes.map((n, i) => [Math.round(n * share[i]), n - Math.round(n * share[i])]);
    expect(fisherRx2(compactTable(cells), 1_000_000)).toBeNull();
    const result = fisherExact(cells);
    expect(result.method).toBe("monte-carlo-rxc");
    expect(result.monteCarlo!.standardError).toBeGreaterThan(0);
  });

  it("is what fisherExact reports for such tables, as an exact test", () => {
    const result = fisherExact([[2, 5], [6, 1], [3, 3], [0, 4]]);
    expect(result.method).toBe("exact-rxc");
  });
});

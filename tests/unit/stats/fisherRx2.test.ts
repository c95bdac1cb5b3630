import { describe, expect, it } from "vitest";
import { compactTable, freemanHaltonExact } from "@shared/stats/freemanHalton";
import { fisherRx2 } from "@shared/stats/fisherRx2";
import { fisherExact } from "@shared/stats";
import { createUniformSource } from "@shared/stats/random";
import { expectRelativeClose } from "./helpers";

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

  it("is what fisherExact reports for such tables, as an exact test", () => {
    const result = fisherExact([[2, 5], [6, 1], [3, 3], [0, 4]]);
    expect(result.method).toBe("exact-rxc");
  });
});

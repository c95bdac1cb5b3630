import { describe, expect, it } from "vitest";
import { cladeIntercept, crudeLogOdds, fitStratifiedSlope, standardisedLogOdds, type CladeGroup } from "@shared/selectivity";
import { expit, fractionalSlope } from "@shared/selectivity/fractionalSlope";
import { createUniformSource } from "@shared/stats/random";
import { expectRelativeClose } from "../stats/helpers";

// The confounding judgement pools taxa that share a value (one term per value, weighted by its
// taxa: the same likelihood). Here each pooled computation is checked against the slow, obvious
// one over the taxa one by one.

/** Invented clades with clade-level risk and values rounded to one decimal (so that many taxa share a value). */
function inventedClades(clades: number, perClade: number, seed: number): CladeGroup[] {
  const random = createUniformSource(seed);
  return Array.from({ length: clades }, () => {
    const risk = random() * 2 - 1;
    const x = Float64Array.from({ length: perClade }, () => Number((random() * 4 - 2).toFixed(1)));
    const y = Uint8Array.from(x, (v) => (random() < expit(risk - 0.4 * v) ? 1 : 0));
    return { x, y };
  });
}

/** The taxa one by one: values, unit weights and outcomes. */
function flat(groups: CladeGroup[]) {
  const x = Float64Array.from(groups.flatMap((g) => Array.from(g.x)));
  const y = Float64Array.from(groups.flatMap((g) => Array.from(g.y)));
  return { x, y, w: new Float64Array(x.length).fill(1) };
}

/** The clade-standardised marginal slope computed taxon by taxon (the risk curve read at every taxon's value). */
function standardisedByTaxa(groups: CladeGroup[], beta: number): number {
  const intercepts = groups.map((g) => cladeIntercept(g.x, g.y.reduce((a, v) => a + v, 0), beta));
  const total = groups.reduce((a, g) => a + g.x.length, 0);
  const curve = (value: number) => groups.reduce((a, g, k) => a + g.x.length * expit(intercepts[k] + beta * value), 0) / total;
  const { x, w } = flat(groups);
  let targets: Float64Array;
  if (x.length * groups.length <= 200_000) targets = x.map(curve);
  else {
    const low = Math.min(...x);
    const high = Math.max(...x);
    const step = (high - low) / 255;
    const grid = Array.from({ length: 256 }, (_, g) => curve(low + g * step));
    targets = x.map((v) => {
      const position = (v - low) / step;
      const g = Math.min(254, Math.max(0, Math.floor(position)));
      return grid[g] * (1 - (position - g)) + grid[g + 1] * (position - g);
    });
  }
  return fractionalSlope(x, w, targets);
}

describe("pooled by value against taxon by taxon", () => {
  const small = inventedClades(30, 25, 5); // 750 taxa x 30 clades: the risk curve at every value
  const large = inventedClades(40, 200, 6); // 8,000 taxa x 40 clades: the risk curve on a grid
  const ones = (groups: CladeGroup[]) => new Float64Array(groups.length).fill(1);

  it("crude slope: the fractional logistic fit over the taxa", () => {
    for (const groups of [small, large]) {
      const { x, y, w } = flat(groups);
      expectRelativeClose(crudeLogOdds(groups, ones(groups), "numeric"), fractionalSlope(x, w, y), 1e-10);
    }
  });

  it("standardised slope: the risk curve read at every taxon, exactly or on the grid", () => {
    for (const groups of [small, large]) {
      expectRelativeClose(standardisedLogOdds(groups, ones(groups), -0.4, "numeric"), standardisedByTaxa(groups, -0.4), 1e-10);
    }
  });

  it("clade intercept of a clade pooled by value", () => {
    const g = large[3];
    const victims = g.y.reduce((a, v) => a + v, 0);
    const values = [...new Set(g.x)].sort((a, b) => a - b);
    const taxa = values.map((v) => g.x.filter((x) => x === v).length);
    expect(values.length).toBeLessThan(g.x.length);
    expectRelativeClose(cladeIntercept(Float64Array.from(values), victims, -0.4, taxa), cladeIntercept(g.x, victims, -0.4), 1e-10);
  });

  it("stratified slope on rows pooled by clade and value (taxa and victims per row)", () => {
    const { x, y } = flat(large);
    const stratum = Int32Array.from(large.flatMap((g, k) => Array.from(g.x, () => k)));
    const byTaxa = fitStratifiedSlope(x, Uint8Array.from(y), stratum, large.length)!;
    const rows = new Map<string, { x: number; stratum: number; trials: number; victims: number }>();
    for (let i = 0; i < x.length; i++) {
      const key = `${stratum[i]}|${x[i]}`;
      const row = rows.get(key) ?? { x: x[i], stratum: stratum[i], trials: 0, victims: 0 };
      row.trials++;
      row.victims += y[i];
      rows.set(key, row);
    }
    const pooled = [...rows.values()];
    expect(pooled.length).toBeLessThan(x.length / 4);
    const fit = fitStratifiedSlope(
      Float64Array.from(pooled, (r) => r.x),
      Float64Array.from(pooled, (r) => r.victims),
      Int32Array.from(pooled, (r) => r.stratum),
      large.length,
      { trials: Float64Array.from(pooled, (r) => r.trials) },
    )!;
    expectRelativeClose(fit.estimate, byTaxa.estimate, 1e-10);
    expectRelativeClose(fit.se, byTaxa.se, 1e-10);
    expectRelativeClose(fit.logLik, byTaxa.logLik, 1e-10);
  });
});

import { describe, expect, it } from "vitest";
import { fitMaximumLikelihood, informationPass, linearPredictors, withRowPattern, Workspace, type Design } from "@shared/stats/logisticKernels";
import { createUniformSource } from "@shared/stats/random";
import { expectRelativeClose } from "./helpers";

// The fast paths of the logistic kernels against the slow, obvious computation: a weighted pass
// (bootstrap counts) against the plain pass over the rows written out that many times, and a pass
// that skips the zeros of a dummy-coded design against the pass over every value.

/** An invented design like a selectivity model's: intercept, a binary trait, a 5-state and a 4-state trait (dummies), two numbers. */
function dummyDesign(n: number, seed: number): { design: Design; y: Float64Array } {
  const random = createUniformSource(seed);
  const p = 10;
  const data = new Float64Array(n * p);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const row = i * p;
    data[row] = 1;
    data[row + 1] = random() < 0.5 ? 1 : 0;
    const habit = Math.floor(random() * 5);
    if (habit > 0) data[row + 1 + habit] = 1;
    const feeding = Math.floor(random() * 4);
    if (feeding > 0) data[row + 5 + feeding] = 1;
    data[row + 8] = random() * 4 - 2;
    data[row + 9] = Number((random() * 3 - 1.5).toFixed(1));
    const eta = -0.3 + 0.5 * data[row + 1] - 0.4 * data[row + 3] + 0.6 * data[row + 8];
    y[i] = random() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
  }
  return { design: { data, n, p }, y };
}

const BETA = Float64Array.from([-0.2, 0.4, 0.1, -0.5, 0.3, 0.05, -0.1, 0.2, 0.55, -0.15]);

function pass(design: Design, y: ArrayLike<number>, beta: ArrayLike<number>, weights?: ArrayLike<number>) {
  const work = new Workspace(design.p);
  const result = informationPass(design, y, beta, work, weights);
  return { ...result, information: Array.from(work.information), score: Array.from(work.score) };
}

describe("weighted information pass (row counts) against the rows written out", () => {
  const { design, y } = dummyDesign(400, 7);
  const random = createUniformSource(11);
  // Bootstrap counts: 400 draws with replacement, so some rows count 0 times and some several.
  const counts = new Float64Array(design.n);
  for (let i = 0; i < design.n; i++) counts[Math.floor(random() * design.n)]++;

  it("gives the score, information, log-likelihood and largest |eta| of the expanded rows", () => {
    const rows: number[] = [];
    const ys: number[] = [];
    for (let i = 0; i < design.n; i++) {
      for (let c = 0; c < counts[i]; c++) {
        rows.push(...design.data.subarray(i * design.p, (i + 1) * design.p));
        ys.push(y[i]);
      }
    }
    const expanded: Design = { data: Float64Array.from(rows), n: ys.length, p: design.p };
    expect(expanded.n).toBe(design.n);
    const slow = pass(expanded, ys, BETA);
    const fast = pass(design, y, BETA, counts);
    expectRelativeClose(fast.logLik, slow.logLik, 1e-12);
    expect(fast.maxAbsEta).toBe(slow.maxAbsEta);
    for (let k = 0; k < slow.score.length; k++) expect(Math.abs(fast.score[k] - slow.score[k])).toBeLessThan(1e-10);
    // Upper triangle only is filled.
    for (let a = 0; a < design.p; a++) {
      for (let b = a; b < design.p; b++) expectRelativeClose(fast.information[a * design.p + b], slow.information[a * design.p + b], 1e-12);
    }
  });

  it("with every count 1 is the plain pass to the last bit", () => {
    expect(pass(design, y, BETA, new Float64Array(design.n).fill(1))).toEqual(pass(design, y, BETA));
  });

  it("leaves out rows of count 0 (the same as dropping them)", () => {
    const kept: number[] = [];
    for (let i = 0; i < design.n; i++) if (counts[i] > 0) kept.push(i);
    const dropped: Design = { data: Float64Array.from(kept.flatMap((i) => Array.from(design.data.subarray(i * design.p, (i + 1) * design.p)))), n: kept.length, p: design.p };
    const once = Float64Array.from(counts, (c) => (c > 0 ? 1 : 0));
    expect(pass(design, y, BETA, once)).toEqual(pass(dropped, kept.map((i) => y[i]), BETA));
  });
});

describe("row pattern of a dummy-coded design against every value", () => {
  const { design, y } = dummyDesign(2000, 3);
  const patterned = withRowPattern(design);

  it("is kept for a mostly-zero design and lists each row's nonzero columns in order", () => {
    expect(patterned.pattern).toBeDefined();
    const { start, column } = patterned.pattern!;
    for (let i = 0; i < design.n; i++) {
      const nonzero: number[] = [];
      for (let j = 0; j < design.p; j++) if (design.data[i * design.p + j] !== 0) nonzero.push(j);
      expect(Array.from(column.subarray(start[i], start[i + 1]))).toEqual(nonzero);
    }
  });

  it("is not made for a dense design", () => {
    const dense: Design = { data: Float64Array.from({ length: 300 }, (_, k) => 1 + (k % 7)), n: 100, p: 3 };
    expect(withRowPattern(dense)).toBe(dense);
  });

  it("gives the same pass, weighted pass and linear predictors to the last bit", () => {
    expect(pass(patterned, y, BETA)).toEqual(pass(design, y, BETA));
    const counts = Float64Array.from({ length: design.n }, (_, i) => i % 3);
    expect(pass(patterned, y, BETA, counts)).toEqual(pass(design, y, BETA, counts));
    const eta = linearPredictors(patterned, BETA, new Float64Array(design.n));
    expect(eta).toEqual(linearPredictors(design, BETA, new Float64Array(design.n)));
    // And the obvious sum, row by row.
    for (let i = 0; i < design.n; i += 97) {
      let sum = 0;
      for (let j = 0; j < design.p; j++) sum += design.data[i * design.p + j] * BETA[j];
      expect(eta[i]).toBe(sum);
    }
  });

  it("falls back to every value when beta is not finite (0 x NaN is NaN, not 0)", () => {
    const bad = Float64Array.from(BETA);
    bad[3] = NaN;
    expect(pass(patterned, y, bad)).toEqual(pass(design, y, bad));
    expect(linearPredictors(patterned, bad, new Float64Array(design.n))).toEqual(linearPredictors(design, bad, new Float64Array(design.n)));
  });

  it("fits the same maximum likelihood estimates to the last bit", () => {
    const slow = fitMaximumLikelihood(design, y, 25, 1e-8);
    const fast = fitMaximumLikelihood(patterned, y, 25, 1e-8);
    expect(Array.from(fast.beta)).toEqual(Array.from(slow.beta));
    expect(fast.deviance).toBe(slow.deviance);
    expect(fast.iterations).toBe(slow.iterations);
  });
});

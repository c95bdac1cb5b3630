import { expect } from "vitest";

/** Asserts |actual - expected| <= relativeTolerance * |expected| (exact match when expected is 0). */
export function expectRelativeClose(actual: number, expected: number, relativeTolerance: number): void {
  expect(Math.abs(actual - expected), `${actual} should be within relative ${relativeTolerance} of ${expected}`).toBeLessThanOrEqual(
    relativeTolerance * Math.abs(expected),
  );
}

/** Asserts |actual - expected| <= absoluteTolerance. */
export function expectAbsoluteClose(actual: number, expected: number, absoluteTolerance: number): void {
  expect(Math.abs(actual - expected), `${actual} should be within ${absoluteTolerance} of ${expected}`).toBeLessThanOrEqual(absoluteTolerance);
}

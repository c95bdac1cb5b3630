import { describe, expect, it } from "vitest";
import { outcomeWarnings } from "@shared/outcomes";

// Stages just below and above an invented boundary at 66 Ma, with the chart's ages for familiarity:
// Maastrichtian base 72.2, Danian base 66.00, Selandian base 61.66 (ICS chart v2024/12, Cohen et al. 2025).
// The taxa are invented; outcomes follow the rules of shared/outcomes/classifyAcrossBoundary.ts.
const stages = [
  { name: "Maastrichtian", base: 72.2, top: 66 },
  { name: "Danian", base: 66, top: 61.66 },
];
const BOUNDARY = 66;
const WINDOW = 6.2; // the Maastrichtian's duration

describe("outcomeWarnings", () => {
  const taxa = [
    { fad: 80, lad: 60 }, // 0: survivor spanning several stages: no warning
    { fad: 70, lad: 68 }, // 1: victim within the Maastrichtian, last seen below the boundary
    { fad: null, lad: 66 }, // 2: missing first appearance
    { fad: 67, lad: 69 }, // 3: inverted
    { fad: 72.2, lad: 66 }, // 4: victim known from the Maastrichtian only, last seen at the boundary
    { fad: 90, lad: 71 }, // 5: victim spanning stages, last seen below the boundary
    { fad: 71, lad: 70 }, // 6: single-interval victim, last seen below the boundary
    { fad: 95, lad: 90 }, // 7: excluded (gone before the window), single-interval in no given stage anyway
    { fad: 65, lad: 63 }, // 8: excluded (starts after the boundary) though within the Danian: not flagged
    { fad: Number.NaN, lad: 3 }, // 9: NaN counts as missing
    { fad: 5, lad: -2 }, // 10: negative age is invalid
  ];
  const warnings = outcomeWarnings(taxa, BOUNDARY, WINDOW, stages);

  it("lists missing ranges (null, undefined or NaN ages)", () => {
    expect(warnings.missingRange).toEqual({ count: 2, indices: [2, 9] });
  });
  it("lists invalid ranges (inverted or negative) instead of throwing", () => {
    expect(warnings.invalidRange).toEqual({ count: 2, indices: [3, 10] });
  });
  it("lists survivors and victims known from a single interval, and not excluded taxa", () => {
    expect(warnings.singleInterval).toEqual({ count: 3, indices: [1, 4, 6] });
  });
  it("lists victims last seen below the boundary inside the window (possible range truncation)", () => {
    expect(warnings.lastSeenBelowBoundary).toEqual({ count: 3, indices: [1, 5, 6] });
  });
  it("gives empty groups for clean data", () => {
    const clean = outcomeWarnings([{ fad: 80, lad: 60 }, { fad: 75, lad: 66 }], BOUNDARY, WINDOW, stages);
    expect(clean).toEqual({
      missingRange: { count: 0, indices: [] },
      invalidRange: { count: 0, indices: [] },
      singleInterval: { count: 0, indices: [] },
      lastSeenBelowBoundary: { count: 0, indices: [] },
    });
  });
  it("matches its documented example", () => {
    const example = outcomeWarnings(
      [{ fad: 80, lad: 60 }, { fad: 70, lad: 68 }, { fad: null, lad: 66 }, { fad: 67, lad: 69 }, { fad: 72.2, lad: 66 }],
      66,
      6.2,
      stages,
    );
    expect(example).toEqual({
      missingRange: { count: 1, indices: [2] },
      invalidRange: { count: 1, indices: [3] },
      singleInterval: { count: 2, indices: [1, 4] },
      lastSeenBelowBoundary: { count: 1, indices: [1] },
    });
  });
  it("throws for an unusable boundary, window or interval", () => {
    expect(() => outcomeWarnings([], Number.NaN, WINDOW, stages)).toThrow(/boundary/);
    expect(() => outcomeWarnings([], BOUNDARY, -1, stages)).toThrow(/window/);
    expect(() => outcomeWarnings([], BOUNDARY, WINDOW, [{ name: "bad", base: 1, top: 1 }])).toThrow(/index 0 \(bad\)/);
  });
});

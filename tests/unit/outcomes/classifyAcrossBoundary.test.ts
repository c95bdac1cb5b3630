import { describe, expect, it } from "vitest";
import { classifyAcrossBoundary } from "@shared/outcomes";

// The rules are the project's own (outcomeOf in shared/outcomes/classifyAcrossBoundary.ts): survivor when fad > boundary > lad;
// victim when fad > boundary and boundary <= lad <= boundary + window; everything else excluded.
// All ranges below are invented and worked by hand against those rules.
const BOUNDARY = 66; // invented test boundary (the K-Pg age, 66.0 Ma, ICS chart v2024/12, only for familiarity)
const WINDOW = 4; // invented window of 4 Myr, so the far edge is 70 Ma exactly

describe("classifyAcrossBoundary", () => {
  it("calls a range that crosses the boundary a survivor", () => {
    expect(classifyAcrossBoundary([{ fad: 80, lad: 60 }], BOUNDARY, WINDOW)).toEqual(["survivor"]);
    // Survives by a hair: last seen just after the boundary.
    expect(classifyAcrossBoundary([{ fad: 66.5, lad: 65.999 }], BOUNDARY, WINDOW)).toEqual(["survivor"]);
  });

  it("calls a range that touches the boundary only at its last appearance a victim (lad == boundary)", () => {
    expect(classifyAcrossBoundary([{ fad: 75, lad: 66 }], BOUNDARY, WINDOW)).toEqual(["victim"]);
  });

  it("excludes a range that starts at the boundary (fad == boundary)", () => {
    expect(classifyAcrossBoundary([{ fad: 66, lad: 60 }], BOUNDARY, WINDOW)).toEqual(["excluded"]);
    expect(classifyAcrossBoundary([{ fad: 66, lad: 66 }], BOUNDARY, WINDOW)).toEqual(["excluded"]);
  });

  it("excludes a range that starts after the boundary", () => {
    expect(classifyAcrossBoundary([{ fad: 64, lad: 60 }], BOUNDARY, WINDOW)).toEqual(["excluded"]);
  });

  it("calls a range ending exactly at the window's far edge a victim (lad == boundary + window)", () => {
    expect(classifyAcrossBoundary([{ fad: 75, lad: 70 }], BOUNDARY, WINDOW)).toEqual(["victim"]);
  });

  it("excludes a range ending just beyond the window's far edge", () => {
    expect(classifyAcrossBoundary([{ fad: 75, lad: 70.001 }], BOUNDARY, WINDOW)).toEqual(["excluded"]);
  });

  it("calls a range lying wholly inside the window a victim", () => {
    expect(classifyAcrossBoundary([{ fad: 69, lad: 67 }], BOUNDARY, WINDOW)).toEqual(["victim"]);
  });

  it("takes in a last appearance at a stage base when the window is that stage's duration computed in floating point", () => {
    // Maastrichtian base 72.2, Danian base 66.00 (ICS chart v2024/12, Cohen et al. 2025); 72.2 - 66 = 6.200000000000003.
    const window = 72.2 - 66;
    expect(classifyAcrossBoundary([{ fad: 80, lad: 72.2 }], 66, window)).toEqual(["victim"]);
    // With no slack the comparison is exact: a lad 1e-6 Myr beyond the edge is excluded either way.
    expect(classifyAcrossBoundary([{ fad: 80, lad: 72.200001 }], 66, window, { edgeTolerance: 0 })).toEqual(["excluded"]);
  });

  it("classifies a mixed list in input order", () => {
    const taxa = [
      { fad: 80, lad: 60 }, // survivor
      { fad: 75, lad: 66 }, // victim at the boundary
      { fad: 90, lad: 80 }, // gone long before the window
      { fad: 66, lad: 60 }, // starts at the boundary
      { fad: 70, lad: 68 }, // victim inside the window
    ];
    expect(classifyAcrossBoundary(taxa, BOUNDARY, WINDOW)).toEqual(["survivor", "victim", "excluded", "excluded", "victim"]);
  });

  it("with a zero window, counts as victims only ranges ending at the boundary", () => {
    expect(classifyAcrossBoundary([{ fad: 75, lad: 66 }, { fad: 75, lad: 66.5 }], BOUNDARY, 0)).toEqual(["victim", "excluded"]);
  });

  it("returns an empty list for no taxa", () => {
    expect(classifyAcrossBoundary([], BOUNDARY, WINDOW)).toEqual([]);
  });

  it("throws on an inverted range, naming the taxon's index", () => {
    const taxa = [
      { fad: 80, lad: 60 },
      { fad: 75, lad: 66 },
      { fad: 60, lad: 70 }, // inverted: first appearance younger than last
    ];
    expect(() => classifyAcrossBoundary(taxa, BOUNDARY, WINDOW)).toThrow(/index 2: inverted range/);
  });

  it("rejects NaN and missing ages clearly, naming the index", () => {
    expect(() => classifyAcrossBoundary([{ fad: Number.NaN, lad: 60 }], BOUNDARY, WINDOW)).toThrow(/index 0: first appearance \(fad\) is NaN/);
    expect(() => classifyAcrossBoundary([{ fad: 80, lad: 60 }, { fad: 80, lad: Number.NaN }], BOUNDARY, WINDOW)).toThrow(
      /index 1: last appearance \(lad\) is NaN/,
    );
    const withNull = [{ fad: null, lad: 60 }] as unknown as Array<{ fad: number; lad: number }>;
    expect(() => classifyAcrossBoundary(withNull, BOUNDARY, WINDOW)).toThrow(/index 0: first appearance \(fad\) is missing/);
  });

  it("rejects negative ages and a bad boundary or window", () => {
    expect(() => classifyAcrossBoundary([{ fad: 5, lad: -1 }], BOUNDARY, WINDOW)).toThrow(/index 0: last appearance \(lad\) is negative/);
    expect(() => classifyAcrossBoundary([], Number.NaN, WINDOW)).toThrow(/boundary must be a finite number/);
    expect(() => classifyAcrossBoundary([], BOUNDARY, -1)).toThrow(/window must not be negative/);
  });
});

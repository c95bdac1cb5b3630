import { describe, expect, it } from "vitest";
import { agePlausibilityWarnings, referenceSpan } from "../../../shared/imports/agePlausibility";

// The thresholds (a tenth of the youngest age, the span's width but at least 10 Myr) are common
// practice, no source. The span 485.4 to 443.8 Ma stands for an Ordovician study (limits as older
// charts gave them, from memory); only the arithmetic below matters.
describe("referenceSpan", () => {
  it("takes the study's ranges when it has any", () => {
    expect(referenceSpan({ oldestMa: 485.4, youngestMa: 443.8 }, [4])).toEqual({ oldestMa: 485.4, youngestMa: 443.8, source: "study" });
  });

  it("else the first to third quartile of the file's ages (nearest rank), so a few wrong ages do not widen it", () => {
    // Sorted: 4, 450, 452, 455, 460, 461, 463, 470 (n = 8). Nearest rank: Q1 = ceil(0.25*8) = 2nd = 450,
    // Q3 = ceil(0.75*8) = 6th = 461.
    expect(referenceSpan(null, [450, 452, 455, 460, 461, 463, 470, 4])).toEqual({ oldestMa: 461, youngestMa: 450, source: "file" });
  });

  it("is null without study ages and with fewer than 8 file ages", () => {
    expect(referenceSpan(null, [450, 452, 455, 460, 461, 463, 4])).toBeNull();
  });
});

describe("agePlausibilityWarnings", () => {
  const ordovician = { oldestMa: 485.4, youngestMa: 443.8, source: "study" as const };
  it("flags a small whole number as a possible interval number (4 <= 443.8 / 10)", () => {
    const [w] = agePlausibilityWarnings([{ row: 5, column: "FAD", taxon: "Rhoviotrema", ma: 4 }], ordovician);
    expect(w).toMatchObject({ row: 5, column: "FAD", taxon: "Rhoviotrema", kind: "age_interval_number" });
    expect(w!.message).toContain("4 Ma looks like an interval number");
    expect(w!.message).toContain("485.4 to 443.8 Ma (the study's ranges)");
  });

  it("flags ages more than the span's width beyond it, and no others", () => {
    // Width 485.4 - 443.8 = 41.6 Myr: younger than 443.8 - 41.6 = 402.2 Ma or older than 485.4 + 41.6 = 527 Ma.
    const cells = [
      { row: 2, column: "FAD", taxon: "a", ma: 402.3 }, // 0.1 Myr inside the tolerance: no warning
      { row: 3, column: "FAD", taxon: "b", ma: 402.1 }, // 41.7 Myr beyond
      { row: 4, column: "LAD", taxon: "c", ma: 526.9 }, // 0.1 Myr inside
      { row: 5, column: "LAD", taxon: "d", ma: 541 }, // 55.6 Myr beyond
      { row: 6, column: "LAD", taxon: "e", ma: 100 }, // a whole number, but above 99: far outside
      { row: 7, column: "LAD", taxon: "f", ma: 4.5 }, // not whole: far outside
    ];
    const warnings = agePlausibilityWarnings(cells, ordovician);
    expect(warnings.map((w) => [w.row, w.kind])).toEqual([
      [3, "age_far_outside"],
      [5, "age_far_outside"],
      [6, "age_far_outside"],
      [7, "age_far_outside"],
    ]);
    expect(warnings[1]!.message).toBe(
      "541 Ma is far outside 485.4 to 443.8 Ma (the study's ranges): 55.6 Myr beyond it (more than 41.6 Myr). Check the value and its unit (Ma, not ka or years).",
    );
  });

  it("uses at least 10 Myr of tolerance for a narrow span, and does not call 4 an interval number in a young study", () => {
    const pliocene = { oldestMa: 5.333, youngestMa: 2.58, source: "study" as const };
    // Width 2.753 < 10: tolerance 10 Myr, so 15 Ma is within 5.333 + 10 and 16 Ma is not. 4 > 2.58 / 10.
    const warnings = agePlausibilityWarnings(
      [
        { row: 2, column: "max", taxon: "a", ma: 4 },
        { row: 3, column: "max", taxon: "b", ma: 15 },
        { row: 4, column: "max", taxon: "c", ma: 16 },
      ],
      pliocene,
    );
    expect(warnings.map((w) => [w.row, w.kind])).toEqual([[4, "age_far_outside"]]);
  });

  it("says nothing without a span", () => {
    expect(agePlausibilityWarnings([{ row: 2, column: "FAD", taxon: "a", ma: 4 }], null)).toEqual([]);
  });
});

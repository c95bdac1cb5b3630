// Numbers with units, plurals, p-values and ages as the app writes them (shared/format/units.ts and
// src/lib/format.ts). The rules checked: a unit symbol never takes a plural "s" (BIPM, The
// International System of Units, 9th edition 2019, section 5.4.3, from memory); a counted noun is
// singular after exactly one and plural otherwise, and a span "3–4" takes the plural (English
// grammar, common practice, no source).
import { describe, expect, it } from "vitest";
import { formatQuantity, formatQuantityRange, isCountUnit, perStep, unitAfter, unitSingular } from "../../../shared/format/units";
import { clause, formatMa, formatP, formatPStatement, pluralize, sentence } from "../../../src/lib/format";
import { wrapLabel } from "../../../src/components/wrapLabel";
import { directionOfOddsRatio, directionOfShare, RISK_COLOUR } from "../../../src/components/chartColours";

describe("unitSingular", () => {
  it("takes the plural s off a word and leaves symbols and invariant words alone", () => {
    expect(unitSingular("regions")).toBe("region");
    expect(unitSingular("cells")).toBe("cell");
    expect(unitSingular("localities")).toBe("locality");
    expect(unitSingular("taxa")).toBe("taxon");
    expect(unitSingular("genera")).toBe("genus");
    expect(unitSingular("species")).toBe("species");
    // Symbols (SI Brochure 5.4.3, from memory: no plural form) and words that are not plurals.
    expect(unitSingular("mm")).toBe("mm");
    expect(unitSingular("km2")).toBe("km2");
    expect(unitSingular("Ma")).toBe("Ma");
    expect(unitSingular("mass")).toBe("mass");
    expect(unitSingular("g")).toBe("g");
  });
});

describe("a number with its unit", () => {
  it("is singular after exactly 1 and plural otherwise", () => {
    expect(formatQuantity(1, "regions")).toBe("1 region");
    expect(formatQuantity(2, "regions")).toBe("2 regions");
    expect(formatQuantity(0, "regions")).toBe("0 regions");
    expect(formatQuantity(1.5, "regions")).toBe("1.5 regions");
    expect(formatQuantity(12.5, "mm")).toBe("12.5 mm");
    expect(formatQuantity(1, "mm")).toBe("1 mm");
    expect(unitAfter(-1, "regions")).toBe("region");
  });

  it("drops a unit that only says 'count'", () => {
    expect(isCountUnit("count")).toBe(true);
    expect(isCountUnit("Number")).toBe(true);
    expect(isCountUnit("regions")).toBe(false);
    expect(formatQuantity(3, "count")).toBe("3");
  });

  it("writes a span with the plural, and a span of one value like that value", () => {
    expect(formatQuantityRange(1, 1, "regions")).toBe("1 region");
    expect(formatQuantityRange(3, 4, "regions")).toBe("3–4 regions");
    expect(formatQuantityRange(5, 5, "regions")).toBe("5 regions");
    expect(formatQuantityRange(0.15, 14.8, "mm")).toBe("0.15–14.8 mm");
    expect(formatQuantityRange(2, 6, null)).toBe("2–6");
  });

  it("names one step of an odds ratio in the singular", () => {
    expect(perStep("regions")).toBe("per 1 region");
    expect(perStep("region")).toBe("per 1 region");
    expect(perStep("mm")).toBe("per 1 mm");
    expect(perStep("count")).toBe("per 1 unit");
    expect(perStep(null)).toBe("per 1 unit");
  });
});

describe("words around numbers", () => {
  it("counts with the right plural", () => {
    expect(pluralize(1, "species", "species")).toBe("1 species");
    expect(pluralize(1, "taxon", "taxa")).toBe("1 taxon");
    expect(pluralize(1204, "taxon", "taxa")).toBe("1,204 taxa");
  });

  it("lets a sentence go on after a clause without a stray full stop", () => {
    expect(`${clause("Matches no state of the chosen traits.")}: ${pluralize(1, "species", "species")}`).toBe("Matches no state of the chosen traits: 1 species");
    expect(clause("Already clean")).toBe("Already clean");
  });

  it("starts every message with a capital", () => {
    expect(sentence("window must be a duration in Myr")).toBe("Window must be a duration in Myr");
  });

  it("writes p-values with the app's digits", () => {
    // Two significant figures below 0.001, three decimals below 0.1, two above (common practice, no source).
    expect(formatP(0.0213)).toBe("0.021");
    expect(formatP(0.43)).toBe("0.43");
    expect(formatP(3.2e-7)).toBe("3.2e-7");
    expect(formatP(1e-20)).toBe("< 1e-15");
    expect(formatPStatement(1e-20)).toBe("p < 1e-15");
    expect(formatP(null)).toBe("—");
  });

  it("writes ages as given, a round figure with one decimal (more in tests/unit/format/ages.test.ts)", () => {
    // ICS chart v2024/12: base of the Turonian 93.9 Ma, of the Triassic 251.902 Ma, of the Danian 66.00 Ma.
    expect(formatMa(93.9)).toBe("93.9 Ma");
    expect(formatMa(251.902)).toBe("251.902 Ma");
    expect(formatMa(66)).toBe("66.0 Ma");
  });
});

describe("chart labels and colours", () => {
  it("wraps a long label at spaces and keeps every word", () => {
    const label = "Feeding mode: Deposit feeder vs Suspension feeder";
    const lines = wrapLabel(label, 30);
    expect(lines.every((l) => l.length <= 30)).toBe(true);
    expect(lines.join(" ")).toBe(label);
    expect(wrapLabel("short", 30)).toEqual(["short"]);
    expect(wrapLabel("a b c d e f", 3, 2)).toEqual(["a b", "c…"]);
  });

  it("gives one direction colour per side of an odds ratio of 1", () => {
    expect(directionOfOddsRatio(3.5)).toBe("higher");
    expect(directionOfOddsRatio(0.4)).toBe("lower");
    expect(directionOfOddsRatio(1)).toBe("even");
    expect(directionOfShare(0.71, 0.3)).toBe("higher");
    expect(directionOfShare(0.1, 0.3)).toBe("lower");
    expect(RISK_COLOUR.higher).not.toBe(RISK_COLOUR.lower);
  });
});

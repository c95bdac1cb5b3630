// The demo's invented finds: the ranges of its trait table are exactly what the range-through reading of
// the finds gives (deriveRanges, widest range the dates allow), the genera left without a compiled range
// have no finds, the finds are reproducible, and the stage sampled poorly on purpose shows a low
// three-timer sampling completeness while the stages around the crisis boundary do not.
import { describe, expect, it } from "vitest";
import { generateDemoStudy } from "../../../scripts/seed/demo/generator";
import { DEMO_POORLY_SAMPLED_STAGE, DEMO_STAGE_SAMPLING, demoOccurrenceCsv, generateDemoOccurrences } from "../../../scripts/seed/demo/occurrences";
import { deriveRanges, threeTimerRates } from "../../../shared/occurrences/index";
import { findUnit } from "../../../shared/timescale/index";

const demo = generateDemoStudy();
const finds = generateDemoOccurrences(demo);

describe("the demo's invented finds", () => {
  it("derive exactly the trait table's first and last appearances (deriveRanges, bounds)", () => {
    const { ranges, dropped } = deriveRanges(finds);
    expect(dropped).toEqual([]);
    const derived = new Map(ranges.map((r) => [r.taxon, r]));
    const withRange = demo.taxa.filter((t) => t.fadMa !== null && t.ladMa !== null);
    // Planted problems: 4 genera without a first appearance and 3 without a last one (generator.ts).
    expect(demo.taxa.length - withRange.length).toBe(7);
    expect(ranges).toHaveLength(withRange.length);
    for (const taxon of withRange) {
      const range = derived.get(taxon.name);
      expect({ taxon: taxon.name, fad: range?.fadMa, lad: range?.ladMa, higher: range?.higherTaxon }).toEqual({
        taxon: taxon.name,
        fad: taxon.fadMa,
        lad: taxon.ladMa,
        higher: taxon.higherTaxon,
      });
    }
    for (const taxon of demo.taxa.filter((t) => t.fadMa === null || t.ladMa === null)) expect(derived.has(taxon.name), taxon.name).toBe(false);
  });

  it("are valid finds (max age >= min age), each in a collection, and the same on every call", () => {
    expect(finds.length).toBeGreaterThan(3000);
    for (const f of finds) {
      expect(f.maxMa).toBeGreaterThanOrEqual(f.minMa);
      expect(f.collection).toMatch(/^VB-[A-Z][a-z]{2}-\d{2}$/);
    }
    expect(generateDemoOccurrences(generateDemoStudy())).toEqual(finds);
    const csv = demoOccurrenceCsv(finds);
    expect(csv.split("\n")[0]).toBe("genus,family,max_ma,min_ma,early_interval,collection");
    expect(csv.trim().split("\n")).toHaveLength(finds.length + 1);
  });

  it("give the poorly sampled stage a low three-timer completeness, and the stages at the crisis boundary a good one", () => {
    const stages = ["Barremian", "Aptian", "Albian", "Cenomanian", "Turonian", "Coniacian", "Santonian"].map((name) => {
      const unit = findUnit(name)!;
      return { name, baseMa: unit.base, topMa: unit.top };
    });
    const rows = threeTimerRates(finds, stages);
    const completeness = Object.fromEntries(rows.map((r) => [r.bin, r.samplingCompleteness]));
    // Completeness estimates the chance a genus ranging through a stage was found in it, which the
    // generator sets per stage (DEMO_STAGE_SAMPLING); with hundreds of genera it lands near that chance.
    expect(completeness[DEMO_POORLY_SAMPLED_STAGE]).toBeLessThan(0.5);
    expect(Math.abs(completeness[DEMO_POORLY_SAMPLED_STAGE]! - DEMO_STAGE_SAMPLING.Coniacian)).toBeLessThan(0.1);
    expect(completeness.Cenomanian).toBeGreaterThan(0.7);
    expect(completeness.Turonian).toBeGreaterThan(0.7);
    console.log("demo three-timer completeness per stage:", completeness);
  });
});

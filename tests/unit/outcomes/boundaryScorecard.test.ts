import { describe, expect, it } from "vitest";
import { boundaryScorecard, type BoundaryScorecardInput } from "@shared/outcomes";

// The criteria and the ~30% convention are common practice, no single source. Wilson (1927) intervals are worked
// by hand: centre (p + z^2/2n) / (1 + z^2/n), half-width z sqrt(p(1-p)/n + z^2/4n^2) / (1 + z^2/n), z = 1.959964.
const base: BoundaryScorecardInput = {
  victims: 180,
  atRisk: 380,
  windowMyr: 6.6,
  higherTaxa: [
    { name: "Clade A (invented)", victims: 40, atRisk: 50 }, // 80% > 30%
    { name: "Clade B (invented)", victims: 10, atRisk: 40 }, // 25%
    { name: "Clade C (invented)", victims: 20, atRisk: 30 }, // 67% > 30%
    { name: "Clade D (invented)", victims: 3, atRisk: 4 }, // fewer than 5 at risk: listed, not read
  ],
  traits: [{ key: "feeding", label: "Feeding", groups: [{ name: "deposit", victims: 30, atRisk: 50 }, { name: "grazer", victims: 5, atRisk: 50 }] }],
  realm: { key: "environment", label: "Environment", groups: [{ name: "marine", victims: 150, atRisk: 300 }, { name: "nonmarine", victims: 30, atRisk: 80 }] },
  geography: { notAssessable: "the study codes range size (regions occupied), not which regions." },
  standingOut: { z: 13.98, n: 6, reason: null },
};
const item = (card: ReturnType<typeof boundaryScorecard>, criterion: string) => card.items.find((i) => i.criterion === criterion)!;

describe("boundaryScorecard", () => {
  const card = boundaryScorecard(base);

  it("reads every criterion, in a fixed order", () => {
    expect(card.items.map((i) => i.criterion)).toEqual(["magnitude", "breadth", "realms", "geography", "brevity", "standingOut"]);
    expect(card.source).toMatch(/common practice, no single source/);
    expect(card.caution).toMatch(/not a global verdict/);
  });

  it("magnitude: 180 of 380 with its Wilson interval lies wholly above 30%", () => {
    // p = 0.473684; z^2/n = 3.841459/380 = 0.010109; centre (0.473684 + 0.005054) / 1.010109 = 0.473947
    // half-width 1.959964 * sqrt(0.249307/380 + 3.841459/577600) / 1.010109 = 1.959964 * 0.025743 / 1.010109 = 0.049951
    // -> [0.42400, 0.52390]
    const magnitude = item(card, "magnitude");
    expect(magnitude.value).toBeCloseTo(0.473684, 5);
    expect(magnitude.ci![0]).toBeCloseTo(0.424, 3);
    expect(magnitude.ci![1]).toBeCloseTo(0.5239, 3);
    expect(magnitude.status).toBe("meets");
    expect(magnitude.summary).toMatch(/180 of 380 taxa at risk lost \(47%, 95% Wilson interval 42% to 52%\)/);
  });

  it("magnitude: uncertain when the interval spans the convention, falls short when below it", () => {
    // 3 of 10: p = 0.3; Wilson [0.1078, 0.6032] spans 0.3
    expect(item(boundaryScorecard({ ...base, victims: 3, atRisk: 10 }), "magnitude").status).toBe("uncertain");
    // 20 of 200: p = 0.1; Wilson [0.0659, 0.1488] lies below 0.3
    expect(item(boundaryScorecard({ ...base, victims: 20, atRisk: 200 }), "magnitude").status).toBe("falls short");
    expect(item(boundaryScorecard({ ...base, victims: 0, atRisk: 0 }), "magnitude")).toMatchObject({ status: "not assessable", value: null });
  });

  it("breadth: 2 of the 3 higher taxa with at least 5 at risk lost more than 30% (the fourth is too small to read)", () => {
    const breadth = item(card, "breadth");
    const clades = breadth.dimensions[0];
    expect(clades).toMatchObject({ key: "higherTaxon", assessed: 3, over: 2 });
    expect(clades.share).toBeCloseTo(2 / 3, 12);
    expect(clades.groups.map((g) => g.over)).toEqual([true, false, true, null]);
    expect(breadth.status).toBe("meets"); // 2/3 >= one half
    // feeding: deposit 60% > 30%, grazer 10%: 1 of 2 states
    expect(breadth.dimensions[1]).toMatchObject({ key: "feeding", assessed: 2, over: 1 });
    expect(breadth.summary).toMatch(/2 of 3 higher taxa .* lost more than 30% \(Feeding: 1 of 2 states\)/);
  });

  it("breadth with a higher share: only Clade A loses more than 70%", () => {
    const breadth = item(boundaryScorecard({ ...base, breadthShare: 0.7 }), "breadth");
    expect(breadth.dimensions[0]).toMatchObject({ assessed: 3, over: 1 });
    expect(breadth.status).toBe("falls short"); // 1/3 < one half
  });

  it("realms: marine 50% and non-marine 37.5% both above 30%", () => {
    const realms = item(card, "realms");
    expect(realms.status).toBe("meets");
    expect(realms.summary).toMatch(/2 of 2 states of Environment lost more than 30% \(marine, nonmarine\)/);
    // a single realm read, or no realm trait: not assessable
    const oneRealm = boundaryScorecard({ ...base, realm: { key: "environment", label: "Environment", groups: [{ name: "marine", victims: 150, atRisk: 300 }, { name: "nonmarine", victims: 1, atRisk: 2 }] } });
    expect(item(oneRealm, "realms").status).toBe("not assessable");
    expect(item(boundaryScorecard({ ...base, realm: null }), "realms").summary).toMatch(/^Not assessable from this study: the codebook has no trait for environment/);
    // nonmarine 20% (16 of 80) is below the share: falls short
    const spared = boundaryScorecard({ ...base, realm: { key: "environment", label: "Environment", groups: [{ name: "marine", victims: 150, atRisk: 300 }, { name: "nonmarine", victims: 16, atRisk: 80 }] } });
    expect(item(spared, "realms").status).toBe("falls short");
  });

  it("geography: not assessable with the reason given, or read over the states of a region trait", () => {
    expect(item(card, "geography")).toMatchObject({ status: "not assessable", summary: "Not assessable from this study: the study codes range size (regions occupied), not which regions." });
    const regions = boundaryScorecard({
      ...base,
      geography: { key: "region", label: "Region", groups: [{ name: "north", victims: 10, atRisk: 20 }, { name: "south", victims: 2, atRisk: 20 }, { name: "east", victims: 9, atRisk: 20 }] },
    });
    // north 50%, east 45% above 30%; south 10%: 2 of 3 >= one half
    expect(item(regions, "geography")).toMatchObject({ status: "meets" });
    expect(item(regions, "geography").value).toBeCloseTo(2 / 3, 12);
  });

  it("brevity reports the window; standing out reads the robust z against 3.5", () => {
    expect(item(card, "brevity")).toMatchObject({ status: "reported", value: 6.6 });
    // Written as the other windows of the Boundary screen: the Cenomanian's 6.6 Myr (ICS chart v2024/12, 100.5 - 93.9), not 6.60.
    expect(item(card, "brevity").summary).toMatch(/window of 6\.6 Myr below/);
    expect(item(card, "standingOut")).toMatchObject({ status: "meets", value: 13.98 });
    expect(item(boundaryScorecard({ ...base, standingOut: { z: 2.1, n: 6, reason: null } }), "standingOut").status).toBe("falls short");
    const tooFew = boundaryScorecard({ ...base, standingOut: { z: null, n: 3, reason: "only 3 other stages have a rate (5 are needed)" } });
    expect(item(tooFew, "standingOut")).toMatchObject({ status: "not assessable", summary: "Not assessable from this study: only 3 other stages have a rate (5 are needed)." });
  });
});

import { mean, sampleStandardDeviation } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { buildDesignMatrix } from "@shared/stats/buildDesignMatrix";
import { logisticRegression } from "@shared/stats/logisticRegression";
import { expectAbsoluteClose } from "./helpers";

describe("a three-level trait tested as one term (Agresti 2007, Table 2.5)", () => {
  // Published worked example: party identification by gender, US General Social Survey, as in
  // Agresti (2007) An Introduction to Categorical Data Analysis, 2nd ed., Table 2.5: females
  // 762 / 327 / 468 and males 484 / 239 / 477 (Democrat / Independent / Republican); G^2 = 30.0 and
  // X^2 = 30.1 on 2 df (FROM MEMORY; scipy 1.17 chi2_contingency gives G^2 = 30.0167, COMPUTED).
  it("the likelihood ratio test of the dummy-coded term equals the table's G^2", () => {
    const counts: Record<string, [number, number]> = { Democrat: [762, 484], Independent: [327, 239], Republican: [468, 477] };
    const party: string[] = [];
    const female: number[] = [];
    for (const [level, [women, men]] of Object.entries(counts)) {
      for (let k = 0; k < women; k++) {
        party.push(level);
        female.push(1);
      }
      for (let k = 0; k < men; k++) {
        party.push(level);
        female.push(0);
      }
    }
    const design = buildDesignMatrix([{ name: "party", kind: "categorical", values: party, reference: "Republican" }]);
    expect(design.names).toEqual(["party=Democrat", "party=Independent"]);
    const fit = logisticRegression(design, female, { terms: design.terms });
    expect(fit.coefficients.map((c) => c.name)).toEqual(["(Intercept)", "party=Democrat", "party=Independent"]);
    expect(fit.terms![0]).toMatchObject({ name: "party", columns: [0, 1], df: 2 });
    expectAbsoluteClose(fit.terms![0].chiSquare, 30.0167, 5e-4);
    expectAbsoluteClose(fit.terms![0].chiSquare, 30.0, 0.05);
    // With a saturated categorical predictor each coefficient is a sample log odds ratio against the reference.
    expectAbsoluteClose(fit.coefficients[1].estimate, Math.log((762 * 477) / (484 * 468)), 1e-8);
  });
});

describe("coding", () => {
  it("dummy codes categories against the reference and keeps numbers as they are", () => {
    const design = buildDesignMatrix([
      { name: "habitat", kind: "categorical", values: ["reef", "basin", "shelf"], reference: "shelf" },
      { name: "size", kind: "numeric", values: [2, 4, 9] },
    ]);
    expect(design.names).toEqual(["habitat=basin", "habitat=reef", "size"]);
    expect(Array.from(design.data)).toEqual([0, 1, 2, 1, 0, 4, 0, 0, 9]);
    expect(design.rows).toBe(3);
    expect(design.columns).toBe(3);
    expect(design.terms).toEqual([
      { name: "habitat", columns: [0, 1] },
      { name: "size", columns: [2] },
    ]);
    expect(design.encodings[0]).toEqual({
      name: "habitat",
      kind: "categorical",
      columns: [0, 1],
      reference: "shelf",
      levels: ["basin", "reef", "shelf"],
      emptyLevels: [],
    });
  });

  it("uses the first level as reference by default and leaves out levels without rows", () => {
    const design = buildDesignMatrix([
      { name: "feeding", kind: "categorical", values: ["filter", "predator", "filter", "grazer"], levels: ["grazer", "filter", "predator", "deposit"] },
    ]);
    expect(design.names).toEqual(["feeding=filter", "feeding=predator"]);
    expect(design.encodings[0]).toMatchObject({ reference: "grazer", emptyLevels: ["deposit"] });
  });

  it("standardises numbers to mean 0 and standard deviation 1 (checked with simple-statistics)", () => {
    const values = [3.2, 5.1, 7.7, 2.4, 9.9, 4.4];
    const design = buildDesignMatrix([{ name: "range", kind: "numeric", values, standardize: true }]);
    const column = Array.from(design.data);
    expectAbsoluteClose(mean(column), 0, 1e-15);
    expectAbsoluteClose(sampleStandardDeviation(column), 1, 1e-14);
    const encoding = design.encodings[0];
    expect(encoding.kind).toBe("numeric");
    if (encoding.kind === "numeric") {
      expectAbsoluteClose(encoding.center, mean(values), 1e-14);
      expectAbsoluteClose(encoding.scale, sampleStandardDeviation(values), 1e-14);
    }
  });
});

describe("rejects impossible input", () => {
  it("says what is wrong", () => {
    expect(() => buildDesignMatrix([])).toThrow("buildDesignMatrix: at least one variable is needed");
    expect(() =>
      buildDesignMatrix([
        { name: "a", kind: "numeric", values: [1, 2] },
        { name: "b", kind: "numeric", values: [1] },
      ]),
    ).toThrow('variable "b" has 1 values but "a" has 2');
    expect(() => buildDesignMatrix([{ name: "a", kind: "numeric", values: [1, NaN] }])).toThrow('variable "a" has the value NaN at row 1');
    expect(() => buildDesignMatrix([{ name: "a", kind: "numeric", values: [1, null as unknown as number] }])).toThrow("a missing value at row 1");
    expect(() => buildDesignMatrix([{ name: "a", kind: "numeric", values: [2, 2], standardize: true }])).toThrow("is constant");
    expect(() => buildDesignMatrix([{ name: "c", kind: "categorical", values: ["x", ""] }])).toThrow('variable "c" has a missing value at row 1');
    expect(() => buildDesignMatrix([{ name: "c", kind: "categorical", values: ["x", "x"] }])).toThrow("only one observed level");
    expect(() => buildDesignMatrix([{ name: "c", kind: "categorical", values: ["x", "y"], reference: "z" }])).toThrow('reference "z" is not a level');
    expect(() => buildDesignMatrix([{ name: "c", kind: "categorical", values: ["x", "q"], levels: ["x", "y"] }])).toThrow('the value "q", which is not among its levels');
    expect(() =>
      buildDesignMatrix([
        { name: "a", kind: "numeric", values: [1, 2] },
        { name: "a", kind: "numeric", values: [1, 2] },
      ]),
    ).toThrow('variable "a" appears twice');
  });
});

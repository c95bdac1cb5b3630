import { describe, expect, it } from "vitest";
import { mantelHaenszel } from "@shared/stats/mantelHaenszel";
import { createUniformSource } from "@shared/stats/random";
import type { Table2x2 } from "@shared/stats/types";
import { expectAbsoluteClose, expectRelativeClose } from "./helpers";

// Published worked example: penicillin and rabbits (Agresti 1990 pp. 231-237), R mantelhaen.test
// help example. Strata are penicillin levels 1/8, 1/4, 1/2, 1, 4; rows delay of injection (none,
// 1.5 h), columns response (cured, died).
const RABBITS: Table2x2[] = [
  [
    [0, 6],
    [0, 5],
  ],
  [
    [3, 3],
    [0, 6],
  ],
  [
    [6, 0],
    [2, 4],
  ],
  [
    [5, 1],
    [6, 0],
  ],
  [
    [2, 0],
    [5, 0],
  ],
];

describe("rabbits (R mantelhaen.test example)", () => {
  const result = mantelHaenszel(RABBITS);

  it("continuity-corrected CMH test, common odds ratio and RBG interval", () => {
    expectAbsoluteClose(result.chiSquare, 3.9286, 5e-5); // R output "Mantel-Haenszel X-squared = 3.9286"
    expectAbsoluteClose(result.pValue, 0.04747, 5e-6); // R output
    expect(result.continuityCorrection).toBe(0.5);
    expectRelativeClose(result.oddsRatio, 7, 1e-12); // R output "common odds ratio 7"
    expectRelativeClose(result.ci[0], 1.026713, 1e-6); // R output
    expectRelativeClose(result.ci[1], 47.725133, 1e-7); // R output
    expectAbsoluteClose(result.logOddsRatioSe, 0.979379, 5e-7); // docs/sources.md section 3 (COMPUTED)
  });

  it("uncorrected statistic", () => {
    const plain = mantelHaenszel(RABBITS, { correct: false });
    expectAbsoluteClose(plain.chiSquare, 5.6571, 5e-5); // docs/sources.md section 3 (COMPUTED)
    expectAbsoluteClose(plain.pValue, 0.01738, 5e-6);
    expect(plain.continuityCorrection).toBe(0);
  });

  it("Breslow-Day drops the strata with a zero margin", () => {
    // COMPUTED only, no published value (docs/sources.md section 3): BD 8.6273, Tarone 8.3583 on 2 df from
    // the 3 informative strata (levels 1/8 and 4 have a zero margin).
    expect(result.breslowDay.strataUsed).toBe(3);
    expect(result.breslowDay.df).toBe(2);
    expectAbsoluteClose(result.breslowDay.uncorrectedChiSquare, 8.6273, 5e-5);
    expectAbsoluteClose(result.breslowDay.uncorrectedPValue, 0.01338, 5e-6);
    expectAbsoluteClose(result.breslowDay.chiSquare, 8.3583, 5e-5);
    expectAbsoluteClose(result.breslowDay.pValue, 0.01531, 5e-6);
  });
});

describe("UCB admissions by department (R mantelhaen.test example; data from R datasets)", () => {
  // Per department: rows admitted / rejected, columns male / female, as R's Admit x Gender x Dept array.
  const departments: Array<[number, number, number, number]> = [
    [512, 313, 89, 19],
    [353, 207, 17, 8],
    [120, 205, 202, 391],
    [138, 279, 131, 244],
    [53, 138, 94, 299],
    [22, 351, 24, 317],
  ];
  const strata: Table2x2[] = departments.map(([maleAdmitted, maleRejected, femaleAdmitted, femaleRejected]) => [
    [maleAdmitted, femaleAdmitted],
    [maleRejected, femaleRejected],
  ]);

  it("CMH test, common odds ratio and interval", () => {
    const result = mantelHaenszel(strata);
    expectAbsoluteClose(result.chiSquare, 1.4269, 5e-5); // R output
    expectAbsoluteClose(result.pValue, 0.2323, 5e-5); // R output
    expectRelativeClose(result.oddsRatio, 0.9046968, 1e-7); // R output
    expectRelativeClose(result.ci[0], 0.7719074, 1e-7); // R output
    expectRelativeClose(result.ci[1], 1.0603298, 1e-7); // R output
    expectAbsoluteClose(mantelHaenszel(strata, { correct: false }).chiSquare, 1.5246, 5e-5); // docs/sources.md section 3 (COMPUTED)
  });

  it("Breslow-Day on 5 df", () => {
    const { breslowDay } = mantelHaenszel(strata);
    // docs/sources.md section 3 (COMPUTED): BD 18.8255, df 5, p 0.002071; Tarone 18.8255.
    expect(breslowDay.df).toBe(5);
    expectAbsoluteClose(breslowDay.uncorrectedChiSquare, 18.8255, 5e-5);
    expectAbsoluteClose(breslowDay.chiSquare, 18.8255, 5e-5);
    expectAbsoluteClose(breslowDay.uncorrectedPValue, 0.002071, 5e-7);
  });
});

describe("Chinese smoking and lung cancer, 8 cities (Agresti Table 3.3 via the Stanford ED257 handout)", () => {
  // (smoker cases, smoker controls, nonsmoker cases, nonsmoker controls) per city.
  const cities: Array<[number, number, number, number]> = [
    [126, 100, 35, 61],
    [908, 688, 497, 807],
    [913, 747, 336, 598],
    [235, 172, 58, 121],
    [402, 308, 121, 215],
    [182, 156, 72, 98],
    [60, 99, 11, 43],
    [104, 89, 21, 36],
  ];
  const strata: Table2x2[] = cities.map(([a, b, c, d]) => [
    [a, b],
    [c, d],
  ]);

  it("matches the SAS output printed there", () => {
    const result = mantelHaenszel(strata, { correct: false });
    expectAbsoluteClose(result.chiSquare, 280.138, 5e-4); // SAS: CMH 280.138 (uncorrected)
    expectAbsoluteClose(result.oddsRatio, 2.174, 5e-4); // SAS: MH OR 2.174
    expectAbsoluteClose(result.breslowDay.uncorrectedChiSquare, 5.2, 5e-4); // SAS: Breslow-Day 5.200
    expect(result.breslowDay.df).toBe(7); // SAS: df 7
    expectAbsoluteClose(result.breslowDay.uncorrectedPValue, 0.636, 5e-4); // SAS: p 0.636
    // RBG interval 1.98400 - 2.38325 (docs/sources.md section 3, COMPUTED; SAS printed test-based limits instead).
    expectAbsoluteClose(result.ci[0], 1.984, 5e-5);
    expectAbsoluteClose(result.ci[1], 2.38325, 5e-5);
  });
});

describe("SAS PROC FREQ migraine example (CMH statistics)", () => {
  it("uncorrected CMH 8.3052, p 0.0040", () => {
    const result = mantelHaenszel(
      [
        [
          [16, 11],
          [5, 20],
        ],
        [
          [12, 16],
          [7, 19],
        ],
      ],
      { correct: false },
    );
    expectAbsoluteClose(result.chiSquare, 8.3052, 5e-5); // SAS docs (VERIFIED secondary)
    expectAbsoluteClose(result.pValue, 0.004, 5e-5);
    expectAbsoluteClose(result.oddsRatio, 3.31317, 5e-6); // docs/sources.md section 3 (COMPUTED)
    expectAbsoluteClose(result.breslowDay.uncorrectedChiSquare, 1.49293, 5e-6); // COMPUTED; SAS 1.4929 from memory
  });
});

describe("Breslow-Day examples printed by DescTools' BreslowDayTest (uncorrected by default)", () => {
  it("teeth: X^2 0.57493, p 0.4483", () => {
    const { breslowDay } = mantelHaenszel([
      [
        [94, 68],
        [6, 4],
      ],
      [
        [17, 12],
        [25, 30],
      ],
    ]);
    expectAbsoluteClose(breslowDay.uncorrectedChiSquare, 0.57493, 5e-6);
    expect(breslowDay.df).toBe(1);
    expectAbsoluteClose(breslowDay.uncorrectedPValue, 0.4483, 5e-5);
  });

  it("cervical: X^2 4.2069, p 0.04026", () => {
    const { breslowDay } = mantelHaenszel([
      [
        [150, 92],
        [148, 96],
      ],
      [
        [118, 25],
        [21, 12],
      ],
    ]);
    expectAbsoluteClose(breslowDay.uncorrectedChiSquare, 4.2069, 5e-5);
    expectAbsoluteClose(breslowDay.uncorrectedPValue, 0.04026, 5e-6);
    // Tarone's correction is small when the strata's odds ratios sit near the common one.
    expect(breslowDay.chiSquare).toBeLessThanOrEqual(breslowDay.uncorrectedChiSquare);
  });
});

describe("continuity correction only when |sum(a - E a)| >= 0.5 (R mantelhaen.test rule)", () => {
  it("leaves the statistic uncorrected when the difference is below 0.5", () => {
    // Invented: a single balanced stratum with a = E a exactly.
    const result = mantelHaenszel([
      [
        [5, 5],
        [5, 5],
      ],
    ]);
    expect(result.continuityCorrection).toBe(0);
    expect(result.chiSquare).toBe(0);
    expect(result.pValue).toBe(1);
  });
});

describe("properties on seeded random strata", () => {
  it("swapping rows inverts the common odds ratio; p-values lie in [0, 1]", () => {
    const random = createUniformSource(77);
    for (let trial = 0; trial < 100; trial++) {
      const strata: Table2x2[] = Array.from({ length: 2 + Math.floor(random() * 5) }, () => [
        [1 + Math.floor(random() * 20), 1 + Math.floor(random() * 20)],
        [1 + Math.floor(random() * 20), 1 + Math.floor(random() * 20)],
      ]);
      const original = mantelHaenszel(strata);
      const swapped = mantelHaenszel(strata.map(([first, second]) => [second, first] as Table2x2));
      expectRelativeClose(swapped.oddsRatio, 1 / original.oddsRatio, 1e-12);
      expectRelativeClose(swapped.ci[0], 1 / original.ci[1], 1e-12);
      for (const p of [original.pValue, original.breslowDay.pValue, original.breslowDay.uncorrectedPValue]) {
        expect(p).toBeGreaterThanOrEqual(0);
        expect(p).toBeLessThanOrEqual(1);
      }
      expect(mantelHaenszel(strata, { correct: false }).chiSquare).toBeGreaterThanOrEqual(original.chiSquare);
    }
  });

  it("skips strata with fewer than two taxa", () => {
    const result = mantelHaenszel([...RABBITS, [[0, 0], [0, 0]], [[1, 0], [0, 0]]]);
    expect(result.strataSkipped).toBe(2);
    expectAbsoluteClose(result.chiSquare, 3.9286, 5e-5); // unchanged from the R example
  });

  it("reports an infinite estimate without an interval when no stratum has b c > 0", () => {
    const result = mantelHaenszel([
      [
        [3, 0],
        [1, 4],
      ],
      [
        [2, 0],
        [0, 5],
      ],
    ]);
    expect(result.oddsRatio).toBe(Infinity);
    expect(result.ci.every(Number.isNaN)).toBe(true);
    expect(Number.isNaN(result.breslowDay.chiSquare)).toBe(true);
  });
});

describe("rejects impossible input", () => {
  it("says what is wrong", () => {
    expect(() => mantelHaenszel([])).toThrow("mantelHaenszel: no strata given");
    expect(() => mantelHaenszel([[[1, -1], [2, 3]]])).toThrow("mantelHaenszel: stratum 0 cell [0][1] is -1; counts must be non-negative integers");
    expect(() => mantelHaenszel([[[1, 2], [2, 3]], [[1, 1.5], [2, 3]]])).toThrow("stratum 1 cell [0][1] is 1.5");
    expect(() => mantelHaenszel([[[1, 2], [2, NaN]]])).toThrow("cell [1][1] is NaN");
    expect(() => mantelHaenszel([[[1, 2, 3], [2, 3, 4]]] as unknown as Table2x2[])).toThrow("stratum 0 is not a 2x2 table");
    expect(() => mantelHaenszel([[[1, 0], [0, 0]]])).toThrow("no stratum holds at least 2 taxa");
    expect(() => mantelHaenszel(RABBITS, { level: 2 })).toThrow("level is 2");
  });
});

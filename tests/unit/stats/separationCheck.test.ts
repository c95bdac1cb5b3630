import { describe, expect, it } from "vitest";
import { separationCheck } from "@shared/stats/separationCheck";

/** Every row on its side of the direction ((2y - 1) x'b >= 0) and at least one strictly. */
function separates(X: number[][], y: number[], b: number[]): { all: boolean; strictCount: number } {
  const products = X.map((row, i) => (y[i] === 1 ? 1 : -1) * row.reduce((s, v, j) => s + v * b[j], 0));
  return { all: products.every((v) => v >= -1e-9), strictCount: products.filter((v) => v > 1e-9).length };
}

const withIntercept = (xs: number[][]) => xs.map((row) => [1, ...row]);

describe("separationCheck: linear programmes of Konis (2007)", () => {
  it("finds complete separation: x = 1, 2, 3 died and 4, 5, 6 survived", () => {
    // Worked by hand: b = (3.5, -1) gives 3.5 - x > 0 for every victim and < 0 for every survivor.
    const X = withIntercept([[1], [2], [3], [4], [5], [6]]);
    const y = [1, 1, 1, 0, 0, 0];
    const result = separationCheck(X, y);
    expect(result.kind).toBe("complete");
    expect(separates(X, y, result.direction)).toEqual({ all: true, strictCount: 6 });
  });

  it("finds quasi-complete separation: x = 1, 2, 3 died and 3, 4, 5 survived (both outcomes at x = 3)", () => {
    // Worked by hand: b = (3, -1) puts every row on its side with the two rows at x = 3 on the line;
    // no b puts both x = 3 rows strictly on opposite sides, as they are the same point.
    const X = withIntercept([[1], [2], [3], [3], [4], [5]]);
    const y = [1, 1, 1, 0, 0, 0];
    const result = separationCheck(X, y);
    expect(result.kind).toBe("quasi-complete");
    const check = separates(X, y, result.direction);
    expect(check.all).toBe(true);
    expect(check.strictCount).toBeGreaterThan(0);
  });

  it("finds none when the outcomes overlap: x = 1, 2, 3, 4 with y = 1, 0, 1, 0", () => {
    // Worked by hand: a victim at 3 lies above a survivor at 2 and a survivor at 2 below a victim at 1,
    // so no threshold on x (and no sign of it) orders them; the maximum likelihood estimate exists.
    const result = separationCheck(withIntercept([[1], [2], [3], [4]]), [1, 0, 1, 0]);
    expect(result.kind).toBe("none");
    expect(result.direction).toEqual([0, 0]);
  });

  it("finds a 2x2 table with an empty cell quasi-completely separated", () => {
    // Table [[3, 0], [2, 4]] (state: 3 victims, 0 survivors; reference: 2 and 4): the state's
    // dummy with b = (0, 1) holds every state row on the victims' side and the reference rows on the line.
    const X = withIntercept([[1], [1], [1], [0], [0], [0], [0], [0], [0]]);
    const y = [1, 1, 1, 1, 1, 0, 0, 0, 0];
    expect(separationCheck(X, y).kind).toBe("quasi-complete");
  });

  it("finds separation that only a combination of predictors makes", () => {
    // Invented points: victims (2, -1), (-1, 2), (1, 1); survivors (-2, 1), (1, -2), (-1, -1).
    // Worked by hand: neither coordinate alone orders them (victims' x1 = 2, -1, 1 and survivors'
    // x1 = -2, 1, -1 overlap; x2 the same), but x1 + x2 is 1, 1, 2 for victims and -1, -1, -2 for survivors.
    const X = withIntercept([[2, -1], [-1, 2], [1, 1], [-2, 1], [1, -2], [-1, -1]]);
    const y = [1, 1, 1, 0, 0, 0];
    const result = separationCheck(X, y);
    expect(result.kind).toBe("complete");
    expect(separates(X, y, result.direction)).toEqual({ all: true, strictCount: 6 });
  });

  it("finds the quasi-complete separation of the endometrial data by NV (Heinze & Schemper 2002)", () => {
    // docs/sources.md section 5: all 13 patients with NV = 1 have HG = 1; the data overlap otherwise.
    const rows = `0,13,1.64,0;0,16,2.26,0;0,8,3.14,0;0,34,2.68,0;0,20,1.28,0;0,5,2.31,0;0,17,1.8,0;0,10,1.68,0;0,26,1.56,0;0,17,2.31,0;
0,8,2.01,0;0,7,1.89,0;0,20,3.15,0;0,10,1.23,0;0,18,1.27,0;0,16,1.76,0;0,18,2,0;0,8,2.64,1;0,29,0.88,1;0,12,1.27,1;
0,20,1.37,1;1,38,0.97,1;1,22,1.14,1;1,7,0.88,1;1,25,0.91,1;1,15,0.58,1;0,7,0.97,1;0,28,1.5,0;0,11,1.33,0;0,19,2.37,0;
0,10,1.82,0;0,10,3.13,0;0,18,1.31,0;0,14,1.92,0;0,21,1.64,0;0,11,2.01,0;0,17,1.88,0;0,25,1.93,0;0,16,2.11,0;0,19,1.29,0;
0,15,1.72,0;0,33,0.75,0;0,24,1.92,0;0,48,1.84,1;0,12,1.11,1;0,19,1.61,1;0,2,1.18,1;1,22,1.44,1;1,40,1.18,1;1,5,0.93,1;
1,0,1.17,1;0,21,1.19,1;0,15,1.06,1;0,29,2.02,0;0,15,2.29,0;0,12,2.33,0;0,3,2.9,0;0,20,1.7,0;0,23,1.41,0;0,12,2.25,0;
0,22,1.54,0;0,42,1.97,0;0,15,1.75,0;0,13,2.16,0;0,14,2.57,0;0,19,1.37,0;0,12,3.61,0;0,13,2.04,0;0,10,2.17,0;0,12,1.69,1;
1,49,0.27,1;0,6,1.84,1;0,5,1.3,1;0,17,0.96,1;1,11,1.01,1;1,21,0.98,1;0,5,0.35,1;1,19,1.02,1;0,33,0.85,1`
      .split(";")
      .map((row) => row.trim().split(",").map(Number));
    const X = withIntercept(rows.map((r) => r.slice(0, 3)));
    const y = rows.map((r) => r[3]);
    const result = separationCheck(X, y);
    expect(result.kind).toBe("quasi-complete");
    const check = separates(X, y, result.direction);
    expect(check.all).toBe(true);
    // Only the NV = 1 rows can lie strictly on their side (the rest overlap): 13 of them.
    expect(check.strictCount).toBeLessThanOrEqual(13);
    expect(check.strictCount).toBeGreaterThan(0);
  });
});

/**
 * A 2x2 table `[[a, b], [c, d]]`: rows are (trait state present, trait state absent), columns are
 * (extinct, survived). An odds ratio above 1 means the state raised the odds of extinction.
 */
export type Table2x2 = [[number, number], [number, number]];

/** A dense matrix stored row by row in one flat array: element (i, j) is `data[i * columns + j]`. */
export interface FlatMatrix {
  data: Float64Array;
  rows: number;
  columns: number;
}

/** Direction of the alternative hypothesis; "greater" means the odds ratio exceeds the null value. */
export type Alternative = "two-sided" | "less" | "greater";

/** How the rows of a binary regression separate (Albert & Anderson 1984). */
export type SeparationKind = "none" | "quasi-complete" | "complete";

export interface SeparationCheckResult {
  kind: SeparationKind;
  /**
   * A separating direction b (|b_j| <= 1, intercept first): every row has (2y - 1) x'b >= 0 and
   * at least one > 0. All zeros when kind is "none".
   */
  direction: number[];
  /** Simplex pivots used by the two linear programmes. */
  pivots: number;
}

/**
 * Detects (quasi-)complete separation before a logistic regression is fitted, by linear programming
 * (Konis 2007, DPhil thesis, University of Oxford, "Linear programming algorithms for detecting
 * separated data in binary logistic regression models"). With z_i = (2 y_i - 1) x_i (x_i holding
 * the intercept), the maximum likelihood estimate fails to exist exactly when some b != 0 has
 * z_i'b >= 0 for every row. The first programme maximises sum_i z_i'b subject to z_i'b >= 0 and
 * -1 <= b_j <= 1: its optimum is 0 without separation and positive with it. The second maximises
 * t subject to z_i'b >= t, -1 <= b_j <= 1, t <= 1: t > 0 means complete separation (every row
 * strictly on its side). Both are solved through their duals, whose p (+ 1) equality rows make a
 * small tableau however many taxa there are, by the simplex method with Bland's rule (Bland 1977,
 * Mathematics of Operations Research 2: 103-107), which cannot cycle.
 *
 * X rows hold the intercept column first (as logisticRegression's design does).
 *
 * @example
 * // x = 1, 2, 3 died and 4, 5, 6 survived: completely separated by x alone.
 * separationCheck([[1, 1], [1, 2], [1, 3], [1, 4], [1, 5], [1, 6]], [1, 1, 1, 0, 0, 0])
 * // => { kind: "complete", direction: [b0, b1] with b1 < 0, ... }
 */
export function separationCheck(X: ArrayLike<number>[] | { data: Float64Array; n: number; p: number }, y: ArrayLike<number>): SeparationCheckResult {
  const rows = Array.isArray(X) ? X.length : X.n;
  const p = Array.isArray(X) ? (rows > 0 ? X[0].length : 0) : X.p;
  if (rows === 0 || p === 0) return { kind: "none", direction: [], pivots: 0 };
  // z_i = (2y - 1) x_i, one constraint per row, held row by row in one flat array (z[i * p + j]).
  const z = new Float64Array(rows * p);
  if (Array.isArray(X)) for (let i = 0; i < rows; i++) for (let j = 0; j < p; j++) z[i * p + j] = X[i][j];
  else z.set(X.data.subarray(0, rows * p));
  const scale = new Array<number>(p).fill(0);
  for (let i = 0; i < rows; i++) {
    const sign = y[i] === 1 ? 1 : -1;
    for (let j = 0; j < p; j++) {
      const v = sign * z[i * p + j];
      z[i * p + j] = v;
      scale[j] = Math.max(scale[j], Math.abs(v));
    }
  }
  // Columns scaled to a largest absolute value of 1, so one tolerance serves every predictor.
  for (let i = 0; i < rows; i++) for (let j = 0; j < p; j++) if (scale[j] > 0) z[i * p + j] /= scale[j];
  const m = rows;
  const tolerance = 1e-9 * Math.max(1, m);

  // Programme 1 through its dual: min 1's + 1't  s.t.  -Z'l + s - t = g,  l, s, t >= 0, g = sum z_i.
  // Columns: l_1..l_m, s_1..s_p, t_1..t_p. Start from s_j (g_j >= 0) or t_j (g_j < 0).
  const g = new Array<number>(p).fill(0);
  for (let i = 0; i < m; i++) for (let j = 0; j < p; j++) g[j] += z[i * p + j];
  const columns1 = m + 2 * p;
  const A1 = Array.from({ length: p }, (_, j) => {
    const line = new Float64Array(columns1);
    for (let i = 0; i < m; i++) line[i] = -z[i * p + j];
    line[m + j] = 1;
    line[m + p + j] = -1;
    return line;
  });
  const cost1 = new Float64Array(columns1);
  for (let k = m; k < columns1; k++) cost1[k] = 1;
  const basis1 = g.map((v, j) => (v >= 0 ? m + j : m + p + j));
  const first = simplexMinimize(A1, g, cost1, basis1);
  if (first.value <= tolerance) return { kind: "none", direction: new Array<number>(p).fill(0), pivots: first.pivots };
  // The primal b are the dual programme's simplex multipliers; undo the column scaling.
  const direction = first.multipliers.map((v, j) => (scale[j] > 0 ? v / scale[j] : 0));

  // Programme 2 through its dual: min 1's + 1'u + w  s.t.  -Z'l + s - u = 0 (p rows),  1'l + w = 1,  all >= 0.
  // Columns: l_1..l_m, s_1..s_p, u_1..u_p, w. Start from s_1..s_p and w.
  const columns2 = m + 2 * p + 1;
  const A2 = Array.from({ length: p + 1 }, (_, j) => {
    const line = new Float64Array(columns2);
    if (j < p) {
      for (let i = 0; i < m; i++) line[i] = -z[i * p + j];
      line[m + j] = 1;
      line[m + p + j] = -1;
    } else {
      for (let i = 0; i < m; i++) line[i] = 1;
      line[columns2 - 1] = 1;
    }
    return line;
  });
  const cost2 = new Float64Array(columns2);
  for (let k = m; k < columns2; k++) cost2[k] = 1;
  const basis2 = [...Array.from({ length: p }, (_, j) => m + j), columns2 - 1];
  const second = simplexMinimize(A2, [...new Array<number>(p).fill(0), 1], cost2, basis2);
  const kind: SeparationKind = second.value > 1e-9 ? "complete" : "quasi-complete";
  const strict = kind === "complete" ? second.multipliers.slice(0, p).map((v, j) => (scale[j] > 0 ? v / scale[j] : 0)) : direction;
  return { kind, direction: strict, pivots: first.pivots + second.pivots };
}

/**
 * Minimises c'x subject to Ax = b, x >= 0 by the tableau simplex method with Bland's rule, from a
 * feasible basis given as one column per row whose column is that row's unit vector up to sign.
 * Returns the optimum and the simplex multipliers y (c_B' B^-1), the solution of the dual programme.
 */
function simplexMinimize(A: Float64Array[], b: number[], c: Float64Array, basis: number[]): { value: number; multipliers: number[]; pivots: number } {
  const rows = A.length;
  const columns = c.length;
  // Tableau rows [A | b], each normalised so that its basic column holds +1.
  const tableau = A.map((line, r) => {
    const row = new Float64Array(columns + 1);
    row.set(line);
    row[columns] = b[r];
    const pivot = row[basis[r]];
    for (let k = 0; k <= columns; k++) row[k] /= pivot;
    return row;
  });
  // Remember B^-1 through the columns that started as the basis (unit vectors up to sign).
  const start = basis.map((column, r) => ({ column, sign: A[r][column] }));
  // Reduced costs d_k = c_k - c_B' B^-1 A_k.
  const reduced = Float64Array.from(c);
  let value = 0;
  for (let r = 0; r < rows; r++) {
    const cb = c[basis[r]];
    if (cb === 0) continue;
    for (let k = 0; k < columns; k++) reduced[k] -= cb * tableau[r][k];
    value += cb * tableau[r][columns];
  }
  let pivots = 0;
  const epsilon = 1e-12;
  for (let guard = 0; guard < 50 * (rows + columns); guard++) {
    // Bland: the lowest-numbered column with a negative reduced cost enters.
    let entering = -1;
    for (let k = 0; k < columns; k++) {
      if (reduced[k] < -epsilon) {
        entering = k;
        break;
      }
    }
    if (entering < 0) break;
    // Ratio test; ties go to the lowest-numbered basic column (Bland).
    let leaving = -1;
    let best = Infinity;
    for (let r = 0; r < rows; r++) {
      const a = tableau[r][entering];
      if (a <= epsilon) continue;
      const ratio = tableau[r][columns] / a;
      if (ratio < best - 1e-15 || (Math.abs(ratio - best) <= 1e-15 && basis[r] < basis[leaving])) {
        best = ratio;
        leaving = r;
      }
    }
    // Unbounded below cannot happen here (both programmes have objectives bounded by 0); stop safely.
    if (leaving < 0) break;
    const pivotRow = tableau[leaving];
    const pivot = pivotRow[entering];
    for (let k = 0; k <= columns; k++) pivotRow[k] /= pivot;
    for (let r = 0; r < rows; r++) {
      if (r === leaving) continue;
      const factor = tableau[r][entering];
      if (factor === 0) continue;
      const row = tableau[r];
      for (let k = 0; k <= columns; k++) row[k] -= factor * pivotRow[k];
    }
    const factor = reduced[entering];
    for (let k = 0; k < columns; k++) reduced[k] -= factor * pivotRow[k];
    value += factor * pivotRow[columns];
    basis[leaving] = entering;
    pivots++;
  }
  // y_r = c_B' B^-1 e_r; column start[r] was sign * e_r, so its reduced cost is c - sign * y_r.
  const multipliers = start.map(({ column, sign }) => (c[column] - reduced[column]) / sign);
  return { value, multipliers, pivots };
}

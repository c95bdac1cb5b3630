// Small dense linear algebra on flat row-major Float64Arrays, sized for p x p information matrices
// (p = number of coefficients, rarely above a few dozen).

/**
 * Cholesky factorisation A = L L' of a symmetric positive definite p x p matrix. Only the upper
 * triangle of `a` is read (element (i, j), i <= j, at a[i * p + j]), which is what the accumulation
 * loops fill. L is written to `lower` (element (i, j), j <= i, at lower[i * p + j]).
 *
 * Returns -1 on success, or the index of the first column whose pivot is not positive or falls below
 * `relativeTolerance` times its diagonal entry: that column is (numerically) a linear combination of
 * the columns before it.
 */
export function choleskyDecompose(a: Float64Array, p: number, lower: Float64Array, relativeTolerance = 0): number {
  for (let j = 0; j < p; j++) {
    let pivot = a[j * p + j];
    const rowJ = j * p;
    for (let k = 0; k < j; k++) pivot -= lower[rowJ + k] * lower[rowJ + k];
    if (!(pivot > relativeTolerance * a[j * p + j]) || !Number.isFinite(pivot)) return j;
    const diagonal = Math.sqrt(pivot);
    lower[rowJ + j] = diagonal;
    for (let i = j + 1; i < p; i++) {
      const rowI = i * p;
      let sum = a[j * p + i];
      for (let k = 0; k < j; k++) sum -= lower[rowI + k] * lower[rowJ + k];
      lower[rowI + j] = sum / diagonal;
    }
    for (let i = 0; i < j; i++) lower[i * p + j] = 0;
  }
  return -1;
}

/** Solves L L' x = b in place of `x` (which may be `b` itself). */
export function choleskySolve(lower: Float64Array, p: number, b: ArrayLike<number>, x: Float64Array): Float64Array {
  for (let i = 0; i < p; i++) {
    let sum = b[i];
    for (let k = 0; k < i; k++) sum -= lower[i * p + k] * x[k];
    x[i] = sum / lower[i * p + i];
  }
  for (let i = p - 1; i >= 0; i--) {
    let sum = x[i];
    for (let k = i + 1; k < p; k++) sum -= lower[k * p + i] * x[k];
    x[i] = sum / lower[i * p + i];
  }
  return x;
}

/** Forward substitution only: solves L v = b, so that v'v = b' A^-1 b. */
export function forwardSubstitute(lower: Float64Array, p: number, b: ArrayLike<number>, v: Float64Array): Float64Array {
  for (let i = 0; i < p; i++) {
    let sum = b[i];
    for (let k = 0; k < i; k++) sum -= lower[i * p + k] * v[k];
    v[i] = sum / lower[i * p + i];
  }
  return v;
}

/** Full symmetric inverse A^-1 from the Cholesky factor of A. */
export function choleskyInverse(lower: Float64Array, p: number): Float64Array {
  const inverse = new Float64Array(p * p);
  const unit = new Float64Array(p);
  const column = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    unit.fill(0);
    unit[j] = 1;
    choleskySolve(lower, p, unit, column);
    for (let i = 0; i < p; i++) inverse[i * p + j] = column[i];
  }
  return inverse;
}

/** ln det A from the Cholesky factor of A. */
export function choleskyLogDeterminant(lower: Float64Array, p: number): number {
  let sum = 0;
  for (let i = 0; i < p; i++) sum += Math.log(lower[i * p + i]);
  return 2 * sum;
}

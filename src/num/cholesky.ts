/**
 * Cholesky factorisation A = L Lᵀ of a symmetric positive definite matrix, in place, column by
 * column (Golub & Van Loan, Matrix Computations, 4th ed. 2013, algorithm 4.2.1, from memory).
 */

/**
 * Overwrite the lower triangle of `a` (n × n row-major, symmetric) with L; the upper triangle is
 * left as it was. Returns -1 when every pivot L_jj² exceeds `floor`, else the index j of the first
 * one that does not (the factorisation stops there: column j is, to within `floor`, a combination
 * of the columns before it).
 */
export function choleskyFactor(a: Float64Array, n: number, floor = 0): number {
  for (let j = 0; j < n; j++) {
    let s = a[j * n + j];
    for (let k = 0; k < j; k++) s -= a[j * n + k] * a[j * n + k];
    if (!(s > floor)) return j;
    const l = Math.sqrt(s);
    a[j * n + j] = l;
    for (let i = j + 1; i < n; i++) {
      let t = a[i * n + j];
      for (let k = 0; k < j; k++) t -= a[i * n + k] * a[j * n + k];
      a[i * n + j] = t / l;
    }
  }
  return -1;
}

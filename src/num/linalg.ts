/**
 * Small dense linear algebra on row-major Float64Array matrices (entry (i, j) of an n×m matrix
 * at i*m + j). Sized for plant models: a few to a few dozen states. No allocation inside the
 * factor/solve kernels; the convenience wrappers copy their inputs.
 */

/**
 * LU factorisation with partial pivoting, in place: afterwards `a` holds L (unit lower, below the
 * diagonal) and U (on and above). `piv[k]` is the row swapped with row k at step k.
 * Returns a cheap conditioning indicator min|u_kk| / max|u_kk| (0 = exactly singular); the
 * factors are complete either way, but solving with an indicator of 0 divides by zero.
 */
export function luFactor(a: Float64Array, n: number, piv: Int32Array): number {
  if (a.length < n * n || piv.length < n) throw new RangeError('luFactor: buffer too small');
  let minPivot = Infinity;
  let maxPivot = 0;
  for (let k = 0; k < n; k++) {
    let p = k;
    let best = Math.abs(a[k * n + k]);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(a[i * n + k]);
      if (v > best) {
        best = v;
        p = i;
      }
    }
    piv[k] = p;
    if (p !== k) {
      for (let j = 0; j < n; j++) {
        const t = a[k * n + j];
        a[k * n + j] = a[p * n + j];
        a[p * n + j] = t;
      }
    }
    if (best < minPivot) minPivot = best;
    if (best > maxPivot) maxPivot = best;
    const pivot = a[k * n + k];
    if (pivot === 0) continue;
    for (let i = k + 1; i < n; i++) {
      const f = a[i * n + k] / pivot;
      a[i * n + k] = f;
      if (f === 0) continue;
      for (let j = k + 1; j < n; j++) a[i * n + j] -= f * a[k * n + j];
    }
  }
  if (n === 0) return 1;
  return maxPivot === 0 ? 0 : minPivot / maxPivot;
}

/** Solve A x = b in place in `b`, given the output of `luFactor`. */
export function luSolve(lu: Float64Array, n: number, piv: Int32Array, b: Float64Array): void {
  for (let k = 0; k < n; k++) {
    const p = piv[k];
    if (p !== k) {
      const t = b[k];
      b[k] = b[p];
      b[p] = t;
    }
  }
  for (let i = 1; i < n; i++) {
    let s = b[i];
    for (let j = 0; j < i; j++) s -= lu[i * n + j] * b[j];
    b[i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = b[i];
    for (let j = i + 1; j < n; j++) s -= lu[i * n + j] * b[j];
    b[i] = s / lu[i * n + i];
  }
}

/**
 * Solve A x = b (A n×n row-major). Returns null when A is singular to working precision
 * (pivot ratio below `tol`, default 1e-14). Inputs are not modified.
 */
export function solve(a: ArrayLike<number>, n: number, b: ArrayLike<number>, tol = 1e-14): Float64Array | null {
  const lu = Float64Array.from(a as ArrayLike<number>);
  const piv = new Int32Array(n);
  const cond = luFactor(lu, n, piv);
  if (!(cond > tol)) return null;
  const x = Float64Array.from(b as ArrayLike<number>);
  luSolve(lu, n, piv, x);
  return x;
}

/** Determinant of an n×n matrix (input not modified). */
export function determinant(a: ArrayLike<number>, n: number): number {
  const lu = Float64Array.from(a as ArrayLike<number>);
  const piv = new Int32Array(n);
  luFactor(lu, n, piv);
  let d = 1;
  for (let k = 0; k < n; k++) {
    d *= lu[k * n + k];
    if (piv[k] !== k) d = -d;
  }
  return d;
}

/** C = A B with A n×m and B m×p, row-major. */
export function matMul(a: ArrayLike<number>, b: ArrayLike<number>, n: number, m: number, p: number): Float64Array {
  const c = new Float64Array(n * p);
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < m; k++) {
      const aik = a[i * m + k];
      if (aik === 0) continue;
      for (let j = 0; j < p; j++) c[i * p + j] += aik * b[k * p + j];
    }
  }
  return c;
}

/** y = A x with A n×m. */
export function matVec(a: ArrayLike<number>, x: ArrayLike<number>, n: number, m: number): Float64Array {
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = 0; j < m; j++) s += a[i * m + j] * x[j];
    y[i] = s;
  }
  return y;
}

/** The n×n identity. */
export function identity(n: number): Float64Array {
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) a[i * n + i] = 1;
  return a;
}

/** Transpose of an n×m matrix (result m×n). */
export function transpose(a: ArrayLike<number>, n: number, m: number): Float64Array {
  const t = new Float64Array(n * m);
  for (let i = 0; i < n; i++) for (let j = 0; j < m; j++) t[j * n + i] = a[i * m + j];
  return t;
}

/** Largest absolute row sum (the induced infinity norm) of an n×m matrix. */
export function normInf(a: ArrayLike<number>, n: number, m: number): number {
  let best = 0;
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = 0; j < m; j++) s += Math.abs(a[i * m + j]);
    if (s > best) best = s;
  }
  return best;
}

/**
 * Full orthogonal factor Q (n×n) of the Householder QR factorisation of an n×m matrix M
 * (M = Q R). When M has full column rank m ≤ n, the last n − m columns of Q are an orthonormal
 * basis of the orthogonal complement of M's column space.
 */
export function householderQ(mat: ArrayLike<number>, n: number, m: number): Float64Array {
  const r = Float64Array.from(mat as ArrayLike<number>);
  const q = identity(n);
  const v = new Float64Array(n);
  const steps = Math.min(m, n - 1);
  for (let k = 0; k < steps; k++) {
    let norm = 0;
    for (let i = k; i < n; i++) norm += r[i * m + k] * r[i * m + k];
    norm = Math.sqrt(norm);
    if (norm === 0) continue;
    const alpha = r[k * m + k] > 0 ? -norm : norm;
    for (let i = 0; i < n; i++) v[i] = i < k ? 0 : r[i * m + k];
    v[k] -= alpha;
    let vv = 0;
    for (let i = k; i < n; i++) vv += v[i] * v[i];
    if (vv === 0) continue;
    // R <- (I - 2 v v^T / v^T v) R
    for (let j = 0; j < m; j++) {
      let s = 0;
      for (let i = k; i < n; i++) s += v[i] * r[i * m + j];
      const f = (2 * s) / vv;
      for (let i = k; i < n; i++) r[i * m + j] -= f * v[i];
    }
    // Q <- Q (I - 2 v v^T / v^T v)
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let j = k; j < n; j++) s += q[i * n + j] * v[j];
      const f = (2 * s) / vv;
      for (let j = k; j < n; j++) q[i * n + j] -= f * v[j];
    }
  }
  return q;
}

/**
 * Solve the complex system (Ar + i Ai) x = (br + i bi) in place by Gaussian elimination with
 * partial pivoting. `ar`, `ai` are destroyed; the solution is left in `br`, `bi`.
 * Returns false (and leaves garbage) when a pivot is exactly zero.
 */
export function solveComplexInPlace(
  ar: Float64Array,
  ai: Float64Array,
  n: number,
  br: Float64Array,
  bi: Float64Array,
): boolean {
  for (let k = 0; k < n; k++) {
    let p = k;
    let best = Math.abs(ar[k * n + k]) + Math.abs(ai[k * n + k]);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(ar[i * n + k]) + Math.abs(ai[i * n + k]);
      if (v > best) {
        best = v;
        p = i;
      }
    }
    if (best === 0) return false;
    if (p !== k) {
      for (let j = k; j < n; j++) {
        let t = ar[k * n + j];
        ar[k * n + j] = ar[p * n + j];
        ar[p * n + j] = t;
        t = ai[k * n + j];
        ai[k * n + j] = ai[p * n + j];
        ai[p * n + j] = t;
      }
      let t = br[k];
      br[k] = br[p];
      br[p] = t;
      t = bi[k];
      bi[k] = bi[p];
      bi[p] = t;
    }
    const pr = ar[k * n + k];
    const pi = ai[k * n + k];
    const den = pr * pr + pi * pi;
    for (let i = k + 1; i < n; i++) eliminateRow(ar, ai, n, br, bi, k, i, pr, pi, den);
  }
  backSubstituteComplex(ar, ai, n, br, bi);
  return true;
}

/**
 * Row i −= f · row k (columns after k, and the right-hand side), f = a[i][k] / pivot, pivot
 * pr + i pi with |pivot|² = den; nothing when a[i][k] is zero. The column-k entry is left as it
 * is (never read again).
 */
function eliminateRow(ar: Float64Array, ai: Float64Array, n: number, br: Float64Array, bi: Float64Array, k: number, i: number, pr: number, pi: number, den: number): void {
  const xr = ar[i * n + k];
  const xi = ai[i * n + k];
  if (xr === 0 && xi === 0) return;
  // f = x / pivot
  const fr = (xr * pr + xi * pi) / den;
  const fi = (xi * pr - xr * pi) / den;
  for (let j = k + 1; j < n; j++) {
    const yr = ar[k * n + j];
    const yi = ai[k * n + j];
    ar[i * n + j] -= fr * yr - fi * yi;
    ai[i * n + j] -= fr * yi + fi * yr;
  }
  const yr = br[k];
  const yi = bi[k];
  br[i] -= fr * yr - fi * yi;
  bi[i] -= fr * yi + fi * yr;
}

/** Solve the upper triangular complex system U x = b in place (x left in br, bi). */
function backSubstituteComplex(ar: Float64Array, ai: Float64Array, n: number, br: Float64Array, bi: Float64Array): void {
  for (let i = n - 1; i >= 0; i--) {
    let sr = br[i];
    let si = bi[i];
    for (let j = i + 1; j < n; j++) {
      const ur = ar[i * n + j];
      const ui = ai[i * n + j];
      sr -= ur * br[j] - ui * bi[j];
      si -= ur * bi[j] + ui * br[j];
    }
    const pr = ar[i * n + i];
    const pi = ai[i * n + i];
    const den = pr * pr + pi * pi;
    br[i] = (sr * pr + si * pi) / den;
    bi[i] = (si * pr - sr * pi) / den;
  }
}

/**
 * Solve (Hr + i Hi) x = (br + i bi) in place for an UPPER HESSENBERG matrix (entries below the
 * subdiagonal are not read): Gaussian elimination with partial pivoting, where only the row below
 * can be a pivot candidate, so the elimination costs O(n²) instead of O(n³) (Golub & Van Loan,
 * Matrix Computations, 4th ed., 2013, sec. 4.3.4, Hessenberg LU). `hr`, `hi` are destroyed; the
 * solution is left in `br`, `bi`. Returns false when a pivot is exactly zero.
 */
export function solveHessenbergComplexInPlace(hr: Float64Array, hi: Float64Array, n: number, br: Float64Array, bi: Float64Array): boolean {
  for (let k = 0; k < n; k++) {
    const d = k * n + k;
    if (k + 1 < n) {
      const s = d + n;
      if (Math.abs(hr[s]) + Math.abs(hi[s]) > Math.abs(hr[d]) + Math.abs(hi[d])) {
        for (let j = k; j < n; j++) {
          let t = hr[k * n + j];
          hr[k * n + j] = hr[(k + 1) * n + j];
          hr[(k + 1) * n + j] = t;
          t = hi[k * n + j];
          hi[k * n + j] = hi[(k + 1) * n + j];
          hi[(k + 1) * n + j] = t;
        }
        let t = br[k];
        br[k] = br[k + 1];
        br[k + 1] = t;
        t = bi[k];
        bi[k] = bi[k + 1];
        bi[k + 1] = t;
      }
    }
    const pr = hr[d];
    const pi = hi[d];
    if (pr === 0 && pi === 0) return false;
    if (k + 1 === n) break;
    eliminateRow(hr, hi, n, br, bi, k, k + 1, pr, pi, pr * pr + pi * pi);
  }
  backSubstituteComplex(hr, hi, n, br, bi);
  return true;
}

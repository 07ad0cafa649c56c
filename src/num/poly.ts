/**
 * Real polynomials with coefficients in descending powers: [c0, c1, ..., cn] is
 * c0 x^n + c1 x^(n-1) + ... + cn (the order plant files use for transfer functions).
 */
import { eigenvalues, type Eigenvalues } from './eig.js';

/** Drop leading coefficients that are exactly zero (keeps at least one coefficient). */
export function polyTrim(c: ArrayLike<number>): number[] {
  let k = 0;
  while (k < c.length - 1 && c[k] === 0) k++;
  const out: number[] = [];
  for (let i = k; i < c.length; i++) out.push(c[i]);
  return out.length === 0 ? [0] : out;
}

/** Value at a real point (Horner). */
export function polyEval(c: ArrayLike<number>, x: number): number {
  let s = 0;
  for (let i = 0; i < c.length; i++) s = s * x + c[i];
  return s;
}

/** Value at the complex point (re + i im), written into out[0], out[1] (Horner). */
export function polyEvalComplex(c: ArrayLike<number>, re: number, im: number, out: Float64Array | number[]): void {
  let sr = 0;
  let si = 0;
  for (let i = 0; i < c.length; i++) {
    const tr = sr * re - si * im + c[i];
    si = sr * im + si * re;
    sr = tr;
  }
  out[0] = sr;
  out[1] = si;
}

/** Product of two polynomials. */
export function polyMul(a: ArrayLike<number>, b: ArrayLike<number>): number[] {
  const out = new Array<number>(a.length + b.length - 1).fill(0);
  for (let i = 0; i < a.length; i++) for (let j = 0; j < b.length; j++) out[i + j] += a[i] * b[j];
  return out;
}

/** Sum of two polynomials (aligned at the constant term). */
export function polyAdd(a: ArrayLike<number>, b: ArrayLike<number>): number[] {
  const n = Math.max(a.length, b.length);
  const out = new Array<number>(n).fill(0);
  for (let i = 0; i < a.length; i++) out[n - a.length + i] += a[i];
  for (let i = 0; i < b.length; i++) out[n - b.length + i] += b[i];
  return out;
}

/**
 * Monic real polynomial with the given roots. Complex roots must come in conjugate pairs; the
 * imaginary parts of the result (rounding only) are dropped.
 */
export function polyFromRoots(re: ArrayLike<number>, im: ArrayLike<number>): number[] {
  let cr = [1];
  let ci = [0];
  for (let k = 0; k < re.length; k++) {
    const nr = new Array<number>(cr.length + 1).fill(0);
    const ni = new Array<number>(cr.length + 1).fill(0);
    for (let i = 0; i < cr.length; i++) {
      nr[i] += cr[i];
      ni[i] += ci[i];
      // times (-root)
      nr[i + 1] += -(cr[i] * re[k] - ci[i] * im[k]);
      ni[i + 1] += -(cr[i] * im[k] + ci[i] * re[k]);
    }
    cr = nr;
    ci = ni;
  }
  return cr;
}

/**
 * Roots of a real polynomial as eigenvalues of its companion matrix (after balancing), the
 * method of Edelman & Murakami, "Polynomial roots from companion matrix eigenvalues", Math.
 * Comp. 64 (1995) 763-776. Exactly-zero trailing coefficients give exact roots at 0.
 * Throws RangeError for the zero polynomial or non-finite coefficients.
 */
export function polyRoots(coefficients: ArrayLike<number>): Eigenvalues {
  for (let i = 0; i < coefficients.length; i++) {
    if (!Number.isFinite(coefficients[i])) throw new RangeError('polyRoots: non-finite coefficient');
  }
  const c = polyTrim(coefficients);
  if (c.length === 1 && c[0] === 0) throw new RangeError('polyRoots: zero polynomial');
  let zerosAtOrigin = 0;
  let end = c.length;
  while (end > 1 && c[end - 1] === 0) {
    end--;
    zerosAtOrigin++;
  }
  const deg = end - 1;
  const re = new Float64Array(deg + zerosAtOrigin);
  const im = new Float64Array(deg + zerosAtOrigin);
  if (deg > 0) {
    // Companion matrix: first row −c[1..]/c[0], ones on the subdiagonal.
    const m = new Float64Array(deg * deg);
    for (let j = 0; j < deg; j++) m[j] = -c[j + 1] / c[0];
    for (let i = 1; i < deg; i++) m[i * deg + i - 1] = 1;
    const e = eigenvalues(m, deg);
    re.set(e.re, 0);
    im.set(e.im, 0);
  }
  return { re, im };
}

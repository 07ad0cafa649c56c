/**
 * Chi-square distribution: the regularised lower incomplete gamma function P(a, x) by its series
 * (x < a + 1) or Legendre's continued fraction (x ≥ a + 1), evaluated with the modified Lentz
 * method (W. H. Press et al., Numerical Recipes, 3rd ed. 2007, section 6.2), and the quantile by
 * bisection on the distribution function. Used for the residual tests of model validation.
 */

/** ln Γ(x) for x > 0 (Lanczos, g = 7, n = 9 coefficients; relative error about 1e-15). */
export function logGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x);
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
    12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
  ];
  const z = x - 1;
  let a = c[0];
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += c[i] / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

/** Regularised lower incomplete gamma P(a, x), a > 0, x ≥ 0. */
export function gammaP(a: number, x: number): number {
  if (!(a > 0) || !(x >= 0)) throw new RangeError('gammaP: need a > 0 and x >= 0');
  if (x === 0) return 0;
  const lead = Math.exp(-x + a * Math.log(x) - logGamma(a));
  if (x < a + 1) {
    let sum = 1 / a;
    let term = sum;
    for (let n = 1; n < 1000; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * 1e-16) break;
    }
    return Math.min(1, sum * lead);
  }
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 1000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-16) break;
  }
  return Math.max(0, 1 - lead * h);
}

/** Distribution function of the chi-square distribution with `k` degrees of freedom at x. */
export function chiSquareCdf(x: number, k: number): number {
  return x <= 0 ? 0 : gammaP(k / 2, x / 2);
}

/** The x with chiSquareCdf(x, k) = p (0 < p < 1), to about 1e-12 relative. */
export function chiSquareQuantile(p: number, k: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError('chiSquareQuantile: p must be in (0, 1)');
  if (!(k > 0)) throw new RangeError('chiSquareQuantile: k must be positive');
  let lo = 0;
  let hi = Math.max(1, k);
  while (chiSquareCdf(hi, k) < p) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-13 * hi; i++) {
    const mid = 0.5 * (lo + hi);
    if (chiSquareCdf(mid, k) < p) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * How well a least-squares Jacobian determines its parameters: the condition number of the
 * column-scaled information matrix JᵀJ (unit diagonal, so it measures collinearity, not units)
 * and, when it is singular, which parameter is the culprit.
 *
 * The culprit is found by a Cholesky factorisation of the scaled matrix in parameter order: the
 * first pivot that falls to rounding level belongs to a parameter whose column is (numerically) a
 * combination of the columns before it, or has no effect at all (a zero column). Naming it turns
 * "the covariance failed" into "delay cannot be told apart from time_constant".
 */
import { choleskyFactor } from './cholesky.js';
import { eigenvalues } from './eig.js';

/** Result of `jacobianConditioning`. */
export interface JacobianConditioning {
  /** λmax/λmin of the scaled JᵀJ over the free parameters (Infinity when singular). */
  condition: number;
  /** Index of the parameter that makes JᵀJ singular, or null. */
  singular: number | null;
  /** For `singular`: indices of earlier free parameters it is collinear with (its scaled correlation above 0.9), possibly empty. */
  partners: number[];
}

/** Relative pivot below which the scaled information matrix counts as singular. */
const PIVOT_FLOOR = 1e-12;

/** Conditioning of the m × n row-major Jacobian `jacobian`; `fixed` parameters are left out. */
export function jacobianConditioning(jacobian: Float64Array, m: number, n: number, fixed: readonly boolean[] = []): JacobianConditioning {
  const free: number[] = [];
  for (let j = 0; j < n; j++) if (!fixed[j]) free.push(j);
  const k = free.length;
  if (k === 0) return { condition: 1, singular: null, partners: [] };
  const M = new Float64Array(k * k);
  for (let i = 0; i < m; i++) {
    for (let a = 0; a < k; a++) {
      const Ja = jacobian[i * n + free[a]];
      if (Ja === 0) continue;
      for (let b = 0; b < k; b++) M[a * k + b] += Ja * jacobian[i * n + free[b]];
    }
  }
  for (let a = 0; a < k; a++) {
    if (!(M[a * k + a] > 0) || !Number.isFinite(M[a * k + a])) return { condition: Infinity, singular: free[a], partners: [] };
  }
  const S = new Float64Array(k * k);
  for (let a = 0; a < k; a++) {
    for (let b = 0; b < k; b++) S[a * k + b] = M[a * k + b] / Math.sqrt(M[a * k + a] * M[b * k + b]);
  }
  // Cholesky in order; the first collapsing pivot names the culprit.
  const j = choleskyFactor(Float64Array.from(S), k, PIVOT_FLOOR);
  if (j >= 0) {
    const partners: number[] = [];
    for (let a = 0; a < j; a++) if (Math.abs(S[j * k + a]) > 0.9) partners.push(free[a]);
    return { condition: Infinity, singular: free[j], partners };
  }
  const ev = eigenvalues(S, k);
  let lo = Infinity;
  let hi = 0;
  for (let i = 0; i < k; i++) {
    const v = Math.abs(ev.re[i]);
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return { condition: lo > 0 ? hi / lo : Infinity, singular: null, partners: [] };
}

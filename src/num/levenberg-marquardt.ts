/**
 * Levenberg–Marquardt nonlinear least squares with a forward-difference Jacobian and box
 * bounds (by projection), returning the Jacobian at the solution for covariance estimates.
 *
 * Levenberg, Q. Appl. Math. 2 (1944) 164-168; Marquardt, J. SIAM 11 (1963) 431-441. The
 * damping is scaled by diag(JᵀJ) (Marquardt's scaling, so parameters of very different size
 * are treated alike) and adapted with Nielsen's rule (H. B. Nielsen, "Damping parameter in
 * Marquardt's method", IMM DTU report 1999: accept → μ ← μ·max(1/3, 1 − (2ρ − 1)³),
 * reject → μ ← μ·ν, ν ← 2ν).
 */
import { choleskyFactor } from './cholesky.js';

/** Options of `levenbergMarquardt`. */
export interface LevenbergMarquardtOptions {
  lower?: ArrayLike<number>;
  upper?: ArrayLike<number>;
  /** Maximum iterations (Jacobian evaluations). Default 100. */
  maxIterations?: number;
  /** Stop when the relative decrease of the sum of squares in an accepted step is below this. Default 1e-10. */
  costTolerance?: number;
  /** Stop when every relative parameter change is below this. Default 1e-9. */
  stepTolerance?: number;
  /** Relative finite-difference step for the Jacobian. Default 1e-6. */
  differenceStep?: number;
  /** Absolute floor of the finite-difference step per parameter (same units as x). Default 1e-8 for each. */
  minDifferenceStep?: ArrayLike<number>;
}

/** Result of `levenbergMarquardt`. */
export interface LevenbergMarquardtResult {
  x: Float64Array;
  /** Residuals at x. */
  residuals: Float64Array;
  /** Sum of squared residuals at x. */
  sse: number;
  /** Jacobian d r_i / d x_j at x, row-major m × n. */
  jacobian: Float64Array;
  iterations: number;
  evaluations: number;
  converged: boolean;
  /** Why it stopped. */
  reason: 'cost' | 'step' | 'gradient' | 'max-iterations' | 'no-progress';
}

/**
 * Minimise sum r(x)² where `residuals(x, out)` writes m residuals into out. The callback must
 * not keep the arrays it is given. A non-finite residual vector counts as an infinite cost.
 */
export function levenbergMarquardt(
  residuals: (x: Float64Array, out: Float64Array) => void,
  x0: ArrayLike<number>,
  m: number,
  options: LevenbergMarquardtOptions = {},
): LevenbergMarquardtResult {
  const n = x0.length;
  if (n === 0) throw new RangeError('levenbergMarquardt: x0 is empty');
  if (!(m >= n)) throw new RangeError('levenbergMarquardt: fewer residuals than parameters');
  const lower = options.lower;
  const upper = options.upper;
  const maxIter = options.maxIterations ?? 100;
  const costTol = options.costTolerance ?? 1e-10;
  const stepTol = options.stepTolerance ?? 1e-9;
  const rel = options.differenceStep ?? 1e-6;

  const project = (x: Float64Array): void => {
    for (let i = 0; i < n; i++) {
      if (lower && x[i] < lower[i]) x[i] = lower[i];
      if (upper && x[i] > upper[i]) x[i] = upper[i];
    }
  };
  let evaluations = 0;
  const sumSq = (x: Float64Array, r: Float64Array): number => {
    evaluations++;
    residuals(x, r);
    const s = sumSquares(r, m);
    return Number.isFinite(s) ? s : Infinity;
  };

  const x = Float64Array.from(x0);
  project(x);
  const r = new Float64Array(m);
  const rTrial = new Float64Array(m);
  const rPert = new Float64Array(m);
  const J = new Float64Array(m * n);
  const JtJ = new Float64Array(n * n);
  const g = new Float64Array(n);
  const A = new Float64Array(n * n);
  const delta = new Float64Array(n);
  const xTrial = new Float64Array(n);
  const xPert = new Float64Array(n);
  const active = new Uint8Array(n);

  let sse = sumSq(x, r);
  if (!Number.isFinite(sse)) throw new RangeError('levenbergMarquardt: residuals not finite at x0');

  const jacobian = (): void => {
    for (let j = 0; j < n; j++) {
      xPert.set(x);
      const floor = options.minDifferenceStep?.[j] ?? 1e-8;
      let h = Math.max(rel * Math.abs(x[j]), floor);
      // Step inward when the forward step would leave the box.
      if (upper && x[j] + h > upper[j]) h = -h;
      xPert[j] = x[j] + h;
      project(xPert);
      const hActual = xPert[j] - x[j];
      if (hActual === 0) {
        // A parameter pinned by lower = upper (held on purpose): it has no direction to move in.
        for (let i = 0; i < m; i++) J[i * n + j] = 0;
        continue;
      }
      sumSq(xPert, rPert);
      fillColumn(J, rPert, r, m, n, j, hActual);
    }
  };

  let mu = -1;
  let nu = 2;
  let iterations = 0;
  let reason: LevenbergMarquardtResult['reason'] = 'max-iterations';
  let converged = false;
  outer: while (iterations < maxIter) {
    iterations++;
    jacobian();
    normalEquations(J, r, m, n, JtJ, g);
    let gMax = 0;
    let dMax = 0;
    for (let a = 0; a < n; a++) {
      // A parameter on a bound whose descent direction points out of the box is held there
      // this iteration (an active set): projecting a full step instead makes the search crawl.
      const atLower = lower !== undefined && x[a] <= lower[a] && g[a] > 0;
      const atUpper = upper !== undefined && x[a] >= upper[a] && g[a] < 0;
      active[a] = atLower || atUpper ? 1 : 0;
      if (!active[a]) gMax = Math.max(gMax, Math.abs(g[a]) / Math.sqrt(JtJ[a * n + a] + 1e-300));
      dMax = Math.max(dMax, JtJ[a * n + a]);
    }
    if (gMax <= 1e-12 * Math.sqrt(sse + 1e-300)) {
      reason = 'gradient';
      converged = true;
      break;
    }
    if (mu < 0) mu = 1e-3;
    // Inner loop: raise the damping until a step lowers the cost.
    for (let tries = 0; tries < 40; tries++) {
      for (let a = 0; a < n; a++) {
        for (let b = 0; b < n; b++) A[a * n + b] = active[a] || active[b] ? 0 : JtJ[a * n + b];
        const d = JtJ[a * n + a] > 0 ? JtJ[a * n + a] : dMax > 0 ? dMax * 1e-12 : 1;
        if (active[a]) {
          A[a * n + a] = 1;
          delta[a] = 0;
        } else {
          A[a * n + a] += mu * d;
          delta[a] = -g[a];
        }
      }
      if (!choleskySolve(A, delta, n)) {
        mu *= nu;
        nu *= 2;
        continue;
      }
      for (let a = 0; a < n; a++) xTrial[a] = x[a] + delta[a];
      project(xTrial);
      const sseTrial = sumSq(xTrial, rTrial);
      // Predicted decrease of the linear model for the (projected) step.
      let pred = 0;
      for (let a = 0; a < n; a++) {
        const da = xTrial[a] - x[a];
        pred -= 2 * g[a] * da;
        let s = 0;
        for (let b = 0; b < n; b++) s += JtJ[a * n + b] * (xTrial[b] - x[b]);
        pred -= da * s;
      }
      if (sseTrial < sse) {
        const rho = pred > 0 ? (sse - sseTrial) / pred : 1;
        mu *= Math.max(1 / 3, 1 - Math.pow(2 * Math.min(rho, 1) - 1, 3));
        nu = 2;
        let stepRel = 0;
        for (let a = 0; a < n; a++) {
          stepRel = Math.max(stepRel, Math.abs(xTrial[a] - x[a]) / (Math.abs(x[a]) + 1e-12));
        }
        const drop = (sse - sseTrial) / (sse + 1e-300);
        x.set(xTrial);
        r.set(rTrial);
        sse = sseTrial;
        if (drop < costTol) {
          reason = 'cost';
          converged = true;
          break outer;
        }
        if (stepRel < stepTol) {
          reason = 'step';
          converged = true;
          break outer;
        }
        continue outer;
      }
      mu *= nu;
      nu *= 2;
    }
    reason = 'no-progress';
    // No decrease even with heavy damping: we are at a minimum to working precision.
    converged = true;
    break;
  }
  // Jacobian at the final point for the covariance.
  jacobian();
  return { x, residuals: r, sse, jacobian: J, iterations, evaluations, converged, reason };
}

function sumSquares(r: Float64Array, m: number): number {
  let s = 0;
  for (let i = 0; i < m; i++) s += r[i] * r[i];
  return s;
}

/** Column j of the forward-difference Jacobian. */
function fillColumn(J: Float64Array, rPert: Float64Array, r: Float64Array, m: number, n: number, j: number, h: number): void {
  for (let i = 0; i < m; i++) J[i * n + j] = (rPert[i] - r[i]) / h;
}

/**
 * JᵀJ (n × n) and Jᵀr (n). A separate small function so the engine optimises this hot loop on
 * its own (inside the large solver body it ran about a hundred times slower).
 */
function normalEquations(J: Float64Array, r: Float64Array, m: number, n: number, JtJ: Float64Array, g: Float64Array): void {
  JtJ.fill(0);
  g.fill(0);
  for (let i = 0; i < m; i++) {
    const row = i * n;
    const ri = r[i];
    for (let a = 0; a < n; a++) {
      const Ja = J[row + a];
      g[a] += Ja * ri;
      for (let b = a; b < n; b++) JtJ[a * n + b] += Ja * J[row + b];
    }
  }
  for (let a = 0; a < n; a++) for (let b = 0; b < a; b++) JtJ[a * n + b] = JtJ[b * n + a];
}

/** Solve A x = b in place (b becomes x) for symmetric positive definite A (n × n, destroyed). */
function choleskySolve(A: Float64Array, b: Float64Array, n: number): boolean {
  if (choleskyFactor(A, n) >= 0) return false;
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= A[i * n + k] * b[k];
    b[i] = s / A[i * n + i];
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = b[i];
    for (let k = i + 1; k < n; k++) s -= A[k * n + i] * b[k];
    b[i] = s / A[i * n + i];
  }
  return true;
}

/**
 * Covariance of the least-squares estimate, s²(JᵀJ)⁻¹ with s² = sse/(m − n) (the usual
 * linearised estimate, e.g. Seber & Wild, Nonlinear Regression, 1989, section 2.1).
 * Returns n × n row-major, or null when JᵀJ is singular. Parameters listed in `fixed`
 * (e.g. at an active bound) get zero rows and columns and are left out of the inversion.
 */
export function leastSquaresCovariance(
  jacobian: Float64Array,
  m: number,
  n: number,
  sse: number,
  fixed: readonly boolean[] = [],
): Float64Array | null {
  const free: number[] = [];
  for (let j = 0; j < n; j++) if (!fixed[j]) free.push(j);
  const k = free.length;
  const out = new Float64Array(n * n);
  if (k === 0) return out;
  const M = new Float64Array(k * k);
  for (let i = 0; i < m; i++) {
    for (let a = 0; a < k; a++) {
      const Ja = jacobian[i * n + free[a]];
      for (let b = 0; b < k; b++) M[a * k + b] += Ja * jacobian[i * n + free[b]];
    }
  }
  const s2 = m > n ? sse / (m - n) : 0;
  const col = new Float64Array(k);
  const L = new Float64Array(k * k);
  for (let c = 0; c < k; c++) {
    L.set(M);
    col.fill(0);
    col[c] = 1;
    if (!choleskySolve(L, col, k)) return null;
    for (let a = 0; a < k; a++) out[free[a] * n + free[c]] = s2 * col[a];
  }
  return out;
}

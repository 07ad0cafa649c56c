/**
 * Nelder–Mead downhill simplex minimiser, deterministic, with restarts.
 *
 * Nelder & Mead, "A simplex method for function minimization", Computer Journal 7 (1965)
 * 308-313; coefficients reflection 1, expansion 2, contraction 1/2, shrink 1/2 (the standard
 * choice, also in Lagarias et al., SIAM J. Optim. 9 (1998) 112-147). A restart rebuilds the
 * initial simplex around the best point found so far: the simplex can collapse onto a line
 * away from the minimum, and rebuilding it costs little (Press et al., Numerical Recipes,
 * section 10.5, recommend restarting at the claimed minimum).
 */

/** Options of `nelderMead`. */
export interface NelderMeadOptions {
  /** Initial step per coordinate (same length as x0); default 10 % of |x0[i]|, or 0.1 where x0[i] = 0. */
  step?: ArrayLike<number>;
  /** Lower bounds (points are clamped into the box before evaluation). */
  lower?: ArrayLike<number>;
  /** Upper bounds. */
  upper?: ArrayLike<number>;
  /** Stop when (fmax − fmin) <= fTolerance · (|fmin| + tiny) and the simplex is small. Default 1e-10. */
  fTolerance?: number;
  /** Stop when every vertex is within xTolerance of the best, per coordinate, relative to the step. Default 1e-8. */
  xTolerance?: number;
  /** Maximum number of function evaluations over all restarts. Default 2000 · n. */
  maxEvaluations?: number;
  /** Number of restarts after the first convergence. Default 2. */
  restarts?: number;
}

/** Result of `nelderMead`. */
export interface NelderMeadResult {
  x: Float64Array;
  f: number;
  evaluations: number;
  /** True when the last run met the tolerances before the evaluation budget ran out. */
  converged: boolean;
}

/**
 * Minimise f over R^n (optionally a box). Deterministic: the same inputs give the same result.
 * f must not keep the array it is given (it is reused).
 */
export function nelderMead(
  f: (x: Float64Array) => number,
  x0: ArrayLike<number>,
  options: NelderMeadOptions = {},
): NelderMeadResult {
  const search = nelderMeadSearch(x0, options);
  let next = search.next();
  while (!next.done) next = search.next(f(next.value));
  return next.value;
}

/**
 * The same search as `nelderMead`, driven from outside one evaluation at a time, so a caller can
 * stop between evaluations and go on later (a screen that must keep answering keys): each
 * `next(value)` hands in f at the point the previous step yielded and yields the next point
 * (the first `next()` takes no value). The yielded array is reused: read it before the next call.
 * Returns the result when the search ends.
 */
export function* nelderMeadSearch(
  x0: ArrayLike<number>,
  options: NelderMeadOptions = {},
): Generator<Float64Array, NelderMeadResult, number> {
  const n = x0.length;
  if (n === 0) throw new RangeError('nelderMead: x0 is empty');
  const lower = options.lower;
  const upper = options.upper;
  const fTol = options.fTolerance ?? 1e-10;
  const xTol = options.xTolerance ?? 1e-8;
  const maxEval = options.maxEvaluations ?? 2000 * n;
  const restarts = options.restarts ?? 2;
  const step = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const s = options.step?.[i];
    step[i] = s !== undefined && s !== 0 ? s : x0[i] !== 0 ? 0.1 * Math.abs(x0[i]) : 0.1;
  }

  const clamp = (x: Float64Array): void => {
    for (let i = 0; i < n; i++) {
      if (lower && x[i] < lower[i]) x[i] = lower[i];
      if (upper && x[i] > upper[i]) x[i] = upper[i];
    }
  };
  let evaluations = 0;
  // A non-finite cost is treated as +Infinity so the simplex moves away from it.
  const finite = (v: number): number => (Number.isFinite(v) ? v : Infinity);

  // n+1 vertices, each a Float64Array; values fv.
  const simplex: Float64Array[] = [];
  for (let j = 0; j <= n; j++) simplex.push(new Float64Array(n));
  const fv = new Float64Array(n + 1);
  const centroid = new Float64Array(n);
  const xr = new Float64Array(n);
  const xe = new Float64Array(n);
  const xc = new Float64Array(n);
  const best = Float64Array.from(x0);
  clamp(best);
  evaluations++;
  let fBest = finite(yield Float64Array.from(best));
  let converged = false;

  for (let run = 0; run <= restarts && evaluations < maxEval; run++) {
    // Build the simplex around the best point; flip a step that leaves the box.
    simplex[0].set(best);
    fv[0] = fBest;
    for (let j = 1; j <= n; j++) {
      const v = simplex[j];
      v.set(best);
      let s = step[j - 1];
      if (upper && v[j - 1] + s > upper[j - 1]) s = -s;
      if (lower && v[j - 1] + s < lower[j - 1]) s = -s;
      v[j - 1] += s;
      clamp(v);
      evaluations++;
      fv[j] = finite(yield v);
    }
    converged = false;
    while (evaluations < maxEval) {
      // Order: find best (lo), worst (hi) and second worst (nh).
      let lo = 0;
      let hi = 0;
      for (let j = 1; j <= n; j++) {
        if (fv[j] < fv[lo]) lo = j;
        if (fv[j] > fv[hi]) hi = j;
      }
      let nh = lo;
      for (let j = 0; j <= n; j++) if (j !== hi && fv[j] > fv[nh]) nh = j;

      // Convergence: values and vertices both tight.
      let xSpread = 0;
      for (let j = 0; j <= n; j++) {
        for (let i = 0; i < n; i++) {
          const d = Math.abs(simplex[j][i] - simplex[lo][i]) / Math.abs(step[i]);
          if (d > xSpread) xSpread = d;
        }
      }
      const fSpread = fv[hi] - fv[lo];
      if ((fSpread <= fTol * (Math.abs(fv[lo]) + 1e-300) || fSpread === 0) && xSpread <= xTol * 1e4) {
        converged = true;
        break;
      }
      if (xSpread <= xTol) {
        converged = true;
        break;
      }

      centroid.fill(0);
      for (let j = 0; j <= n; j++) {
        if (j === hi) continue;
        for (let i = 0; i < n; i++) centroid[i] += simplex[j][i] / n;
      }
      for (let i = 0; i < n; i++) xr[i] = centroid[i] + (centroid[i] - simplex[hi][i]);
      clamp(xr);
      evaluations++;
      const fr = finite(yield xr);
      if (fr < fv[lo]) {
        for (let i = 0; i < n; i++) xe[i] = centroid[i] + 2 * (centroid[i] - simplex[hi][i]);
        clamp(xe);
        evaluations++;
        const fe = finite(yield xe);
        if (fe < fr) {
          simplex[hi].set(xe);
          fv[hi] = fe;
        } else {
          simplex[hi].set(xr);
          fv[hi] = fr;
        }
        continue;
      }
      if (fr < fv[nh]) {
        simplex[hi].set(xr);
        fv[hi] = fr;
        continue;
      }
      // Contraction: outside if the reflected point beats the worst, inside otherwise.
      const outside = fr < fv[hi];
      for (let i = 0; i < n; i++) {
        xc[i] = outside
          ? centroid[i] + 0.5 * (xr[i] - centroid[i])
          : centroid[i] + 0.5 * (simplex[hi][i] - centroid[i]);
      }
      clamp(xc);
      evaluations++;
      const fc = finite(yield xc);
      if (fc < (outside ? fr : fv[hi])) {
        simplex[hi].set(xc);
        fv[hi] = fc;
        continue;
      }
      // Shrink towards the best vertex.
      for (let j = 0; j <= n; j++) {
        if (j === lo) continue;
        for (let i = 0; i < n; i++) simplex[j][i] = simplex[lo][i] + 0.5 * (simplex[j][i] - simplex[lo][i]);
        clamp(simplex[j]);
        evaluations++;
        fv[j] = finite(yield simplex[j]);
      }
    }
    let lo = 0;
    for (let j = 1; j <= n; j++) if (fv[j] < fv[lo]) lo = j;
    const improved = fv[lo] < fBest;
    if (fv[lo] <= fBest) {
      fBest = fv[lo];
      best.set(simplex[lo]);
    }
    // Restart with a smaller simplex: the run converged, so the scale is known better now.
    for (let i = 0; i < n; i++) step[i] *= 0.5;
    if (!improved && run > 0) break;
  }
  return { x: best, f: fBest, evaluations, converged };
}

/**
 * Grey-box fit: estimate named physical parameters of a plant file's `ode` model from a log, by
 * least squares of the engine's simulated output (replay-plant.ts) against the logged output
 * (Levenberg–Marquardt, num/), with the linearised covariance s²(JᵀJ)⁻¹ for intervals and
 * correlations (Seber & Wild, Nonlinear Regression, 1989, section 2.1; Ljung 1999 section 9.3
 * for the same estimate as the prediction-error method with an output-error model).
 *
 * Bounds: the file's `uncertainty` range of a parameter when it has one, else a factor of 1000
 * either side of the file's value (a physical parameter keeps its sign). The file's values are
 * the start. A parameter that ends on a bound gets no interval and is reported as such; when the
 * information matrix is singular the parameter responsible is named (num/jacobian-conditioning.ts)
 * and left without an interval, the others keep theirs.
 */
import { jacobianConditioning, leastSquaresCovariance, levenbergMarquardt } from '../num/index.js';
import type { PlantSpec } from '../model/types.js';
import type { PlantDynamics } from '../sim/index.js';
import type { BumpData } from './bump-data.js';
import { isAtBound } from './fit-model.js';
import { fitStatistics } from './fit-statistics.js';
import type { FitStatistics } from './fit-statistics.js';
import { plantReplay } from './replay-plant.js';

/** One estimated physical parameter. */
export interface GreyBoxParameter {
  name: string;
  /** The file's value (the start). */
  start: number;
  value: number;
  lower: number;
  upper: number;
  /** 'uncertainty' when the bounds are the file's range, else 'default'. */
  boundsFrom: 'uncertainty' | 'default';
  stdError: number | null;
  ci95: [number, number] | null;
  atBound: boolean;
  /** Why there is no interval, when there is none and it is not a bound. */
  undetermined: string | null;
}

/** Result of `fitPlantParameters`. */
export interface GreyBoxFit {
  parameters: GreyBoxParameter[];
  /** Correlation matrix of the estimates (row-major, names order); null without a covariance. */
  correlation: number[] | null;
  /** Condition number of the column-scaled information matrix. */
  condition: number;
  statistics: FitStatistics;
  /** Model output at the estimate, on the data grid. */
  response: Float64Array;
  converged: boolean;
  iterations: number;
  evaluations: number;
  notes: string[];
}

/** Estimate `names` (parameters of `dynamics`, compiled from the ode `spec`) from `data`. */
export function fitPlantParameters(spec: PlantSpec, dynamics: PlantDynamics, data: BumpData, names: readonly string[]): GreyBoxFit {
  if (spec.model.type !== 'ode') throw new RangeError('fitPlantParameters: the plant is not an ode model');
  if (names.length === 0) throw new RangeError('fitPlantParameters: no parameter named');
  const index = names.map((name) => {
    const j = dynamics.paramNames.indexOf(name);
    if (j < 0) throw new RangeError(`fitPlantParameters: unknown parameter ${name}`);
    return j;
  });
  const np = names.length;
  const lower = new Float64Array(np);
  const upper = new Float64Array(np);
  const boundsFrom: GreyBoxParameter['boundsFrom'][] = [];
  const start = new Float64Array(np);
  const floors = new Float64Array(np);
  for (let i = 0; i < np; i++) {
    const v = dynamics.params[index[i]];
    start[i] = v;
    const range = spec.uncertainty[names[i]];
    if (range !== undefined) {
      lower[i] = Math.min(range[0], range[1]);
      upper[i] = Math.max(range[0], range[1]);
      boundsFrom.push('uncertainty');
      start[i] = Math.min(upper[i], Math.max(lower[i], v));
    } else {
      boundsFrom.push('default');
      if (v > 0) [lower[i], upper[i]] = [v / 1000, v * 1000];
      else if (v < 0) [lower[i], upper[i]] = [v * 1000, v / 1000];
      else [lower[i], upper[i]] = [-Infinity, Infinity];
    }
    floors[i] = 1e-9 * Math.max(Math.abs(v), Math.abs(upper[i] - lower[i]) < Infinity ? Math.abs(upper[i] - lower[i]) : 1, 1e-300);
  }
  const replay = plantReplay(spec, dynamics, data.dt, data.u[0]);
  const p = Float64Array.from(dynamics.params);
  const n = data.n;
  const residuals = (x: Float64Array, r: Float64Array): void => {
    for (let i = 0; i < np; i++) p[index[i]] = x[i];
    replay.run(p, data.u, r);
    for (let k = 0; k < n; k++) r[k] -= data.y[k];
  };
  const res = levenbergMarquardt(residuals, start, n, { lower, upper, maxIterations: 60, differenceStep: 1e-6, minDifferenceStep: floors, costTolerance: 1e-10 });
  const x = res.x;
  const fixed = Array.from(x, (v, i) => isAtBound(v, lower[i], upper[i]));
  const notes = [replay.startNote];
  const cond = jacobianConditioning(res.jacobian, n, np, fixed);
  const undetermined: (string | null)[] = new Array<string | null>(np).fill(null);
  let held = fixed.slice();
  let conditioning = cond;
  // Name each parameter that makes the information matrix singular, hold it, keep the others' intervals.
  while (conditioning.singular !== null) {
    const j = conditioning.singular;
    const partners = conditioning.partners.map((q) => names[q]);
    undetermined[j] = partners.length > 0
      ? `the log cannot tell ${names[j]} apart from ${partners.join(', ')} (the information matrix is singular in ${names[j]})`
      : `the log does not depend on ${names[j]} (the information matrix is singular in ${names[j]})`;
    notes.push(`no interval for ${names[j]}: ${undetermined[j]}`);
    held = held.slice();
    held[j] = true;
    conditioning = jacobianConditioning(res.jacobian, n, np, held);
  }
  const cov = leastSquaresCovariance(res.jacobian, n, np, res.sse, held);
  const parameters: GreyBoxParameter[] = names.map((name, i) => {
    const se = cov !== null && !held[i] ? Math.sqrt(Math.max(cov[i * np + i], 0)) : null;
    return {
      name,
      start: dynamics.params[index[i]],
      value: x[i],
      lower: lower[i],
      upper: upper[i],
      boundsFrom: boundsFrom[i],
      stdError: se,
      ci95: se === null ? null : [x[i] - 1.96 * se, x[i] + 1.96 * se],
      atBound: fixed[i],
      undetermined: undetermined[i],
    };
  });
  let correlation: number[] | null = null;
  if (cov !== null) {
    correlation = new Array<number>(np * np).fill(0);
    for (let a = 0; a < np; a++) {
      for (let b = 0; b < np; b++) {
        const d = Math.sqrt(cov[a * np + a] * cov[b * np + b]);
        correlation[a * np + b] = a === b ? (held[a] ? NaN : 1) : d > 0 ? cov[a * np + b] / d : NaN;
      }
    }
  }
  const response = new Float64Array(n);
  residuals(x, response);
  for (let k = 0; k < n; k++) response[k] += data.y[k];
  return {
    parameters,
    correlation,
    condition: conditioning === cond ? cond.condition : Infinity,
    statistics: fitStatistics(data.y, response, res.sse),
    response,
    converged: res.converged,
    iterations: res.iterations,
    evaluations: res.evaluations,
    notes,
  };
}

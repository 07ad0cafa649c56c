/**
 * Fit one model family to a bump test by nonlinear least squares of the simulated response
 * against the whole window (any input signal, not only a clean step).
 *
 * Stages: (1) candidate starting points (the two-point readings, a coarse grid, the
 * first-order fit for the richer families), each scored with the gain and level solved by
 * linear least squares (they enter the response linearly); (2) Levenberg–Marquardt from the
 * best few on a decimated record (long logs only); (3) Levenberg–Marquardt polish on the full
 * record, whose Jacobian gives the covariance.
 *
 * The delay of the inverse-response family is located only to within a sample interval (see
 * `feedthroughCovariance`); its interval reflects that.
 */
import { jacobianConditioning, leastSquaresCovariance, levenbergMarquardt, nelderMead } from '../num/index.js';
import type { BumpData } from './bump-data.js';
import { emptyLti, FIT_KIND_INFO, kindSystem } from './fit-kinds.js';
import type { FitKind } from './fit-kinds.js';
import { fitStatistics } from './fit-statistics.js';
import { ResponseSimulator } from './simulate-response.js';
import type { StepAnalysis } from './step-analysis.js';
import type { StepReading } from './two-point.js';

/** One reported parameter. */
export interface FittedParameter {
  /** snake_case name as in the plant file (gain, time_constant, delay, …). */
  name: string;
  value: number;
  unit: string;
  /** Standard error from the linearised covariance (null when not available, e.g. at a bound). */
  stdError: number | null;
  /** Approximate 95 % interval value ± 1.96 standard errors (null when not available). */
  ci95: [number, number] | null;
  /** True when the estimate sits on a bound of the search box. */
  atBound: boolean;
  /** True for values computed from the fitted ones (e.g. two lags from ωn and ζ). */
  derived: boolean;
  /** Why the parameter has no interval when the information matrix is singular in it (absent otherwise). */
  undetermined?: string;
}

/** A fitted model family. */
export interface ModelFit {
  kind: FitKind;
  /** Fitted vector in the family's order (see `FIT_KIND_INFO`), deviation form, level last. */
  values: number[];
  /** Reference input the deviations are taken from. */
  u0: number;
  parameters: FittedParameter[];
  /** Number of fitted parameters (level included). */
  nParams: number;
  /** Samples fitted. */
  n: number;
  sse: number;
  rmse: number;
  /** RMSE divided by the output's range over the window. */
  nrmse: number;
  /** 1 − SSE/SST (SST about the output's mean). */
  r2: number;
  /** Bayesian information criterion n ln(SSE/n) + k ln n (Schwarz, Ann. Stat. 6 (1978) 461-464). */
  bic: number;
  /** Simulated output on the data grid (absolute units). */
  response: Float64Array;
  /** Covariance of `values` (row-major), null when singular. */
  covariance: number[] | null;
  converged: boolean;
  iterations: number;
  evaluations: number;
  /** Which starting point led to the result. */
  start: string;
  /** Why some parameters have no interval (singular information matrix), one sentence each. */
  undetermined: string[];
}

/** Context shared by the fits of one record. */
export interface FitContext {
  data: BumpData;
  analysis: StepAnalysis;
  reading: StepReading | null;
  /** The first-order fit, used to start the richer families (optional). */
  firstOrder?: ModelFit | null;
  /** Integrating family only: hold the lag at 0 (the pure integrator with dead time, one parameter fewer). */
  withoutLag?: boolean;
}

/** Records longer than this are fitted first on a decimated copy. */
const COARSE_ABOVE = 4000;
const COARSE_TARGET = 2000;

interface Series {
  dt: number;
  n: number;
  du: Float64Array;
  y: Float64Array;
}

/** Fit family `kind` to the record. */
export function fitModel(kind: FitKind, ctx: FitContext): ModelFit {
  const { data, analysis } = ctx;
  const info = FIT_KIND_INFO[kind];
  const np = info.params.length;
  const full: Series = { dt: data.dt, n: data.n, du: new Float64Array(data.n), y: data.y };
  for (let i = 0; i < data.n; i++) full.du[i] = data.u[i] - analysis.u0;
  const coarse = data.n > COARSE_ABOVE ? decimate(full, Math.ceil(data.n / COARSE_TARGET)) : full;
  const duration = data.n * data.dt;
  const [lower, upper] = bounds(kind, data.dt, duration);
  const lagHeld = kind === 'integrating' && ctx.withoutLag === true;
  if (lagHeld) upper[1] = 0;
  const sim = new ResponseSimulator();
  // Families with a direct feed-through find their basin with the continuous (interpolated) form.
  const hasFeedthrough = kind === 'inverse_response';
  sim.interpolateFeedthrough = hasFeedthrough;
  const sys = emptyLti();
  const buf = new Float64Array(data.n);

  const unitResponse = (p: ArrayLike<number>, s: Series, out: Float64Array): void => {
    kindSystem(kind, p, 1, s.dt, sys);
    sim.simulate(sys, p[info.delayIndex], s.dt, s.du, out, s.n);
  };
  // Gain and level by linear least squares for given shape parameters.
  const concentrated = (p: Float64Array, s: Series): number => {
    unitResponse(p, s, buf);
    let s1 = 0;
    let s2 = 0;
    let sy = 0;
    let sry = 0;
    let syy = 0;
    for (let i = 0; i < s.n; i++) {
      const r = buf[i];
      const yi = s.y[i];
      s1 += r;
      s2 += r * r;
      sy += yi;
      sry += r * yi;
      syy += yi * yi;
    }
    const det = s.n * s2 - s1 * s1;
    if (!(Math.abs(det) > 1e-300)) return Infinity;
    const K = (s.n * sry - s1 * sy) / det;
    const y0 = (sy - K * s1) / s.n;
    p[info.gainIndex] = K;
    p[np - 1] = y0;
    // SSE = Σ(y − y0 − K r)², expanded.
    const sse = syy - 2 * K * sry - 2 * y0 * sy + K * K * s2 + 2 * K * y0 * s1 + s.n * y0 * y0;
    return Math.max(sse, 0);
  };
  const residuals = (s: Series) => (p: Float64Array, r: Float64Array): void => {
    kindSystem(kind, p, p[info.gainIndex], s.dt, sys);
    sim.simulate(sys, p[info.delayIndex], s.dt, s.du, r, s.n);
    const y0 = p[np - 1];
    for (let i = 0; i < s.n; i++) r[i] = r[i] + y0 - s.y[i];
  };

  // ---- (1) candidates, scored on the coarse series
  const cands = candidates(kind, ctx, duration);
  const scored: { p: Float64Array; sse: number; label: string }[] = [];
  for (const c of cands) {
    const p = Float64Array.from(c.p);
    for (let i = 0; i < np; i++) p[i] = Math.min(upper[i], Math.max(lower[i], p[i]));
    const sse = concentrated(p, coarse);
    if (Number.isFinite(sse)) scored.push({ p, sse, label: c.label });
  }
  scored.sort((a, b) => a.sse - b.sse);
  if (scored.length === 0) throw new RangeError('fitModel: no finite starting point');

  const yRange = rangeOf(data.y);
  const floors = new Float64Array(np);
  for (let i = 0; i < np; i++) floors[i] = 1e-4 * data.dt;
  floors[info.gainIndex] = 1e-9 * Math.max(Math.abs(scored[0].p[info.gainIndex]), 1e-12);
  floors[np - 1] = 1e-9 * Math.max(yRange, 1e-12);
  if (kind === 'second_order') floors[2] = 1e-7;

  // ---- (2) LM from the best few on the coarse series
  let best: { p: Float64Array; sse: number; label: string } | null = null;
  let evaluations = cands.length;
  let iterations = 0;
  const tries = Math.min(2, scored.length);
  for (let t = 0; t < tries; t++) {
    const res = levenbergMarquardt(residuals(coarse), scored[t].p, coarse.n, {
      lower, upper, maxIterations: 60, minDifferenceStep: floors,
    });
    evaluations += res.evaluations;
    iterations += res.iterations;
    let p = res.x;
    let sse = res.sse;
    if (!res.converged) {
      // A stalled LM run gets a Nelder–Mead pass over the shape parameters from where it stopped.
      const nm = nelderMead((q) => concentrated(Float64Array.from(q), coarse), p, { lower, upper, maxEvaluations: 100 * np });
      evaluations += nm.evaluations;
      if (nm.f < sse) {
        p = Float64Array.from(nm.x);
        sse = concentrated(p, coarse);
      }
    }
    if (best === null || sse < best.sse) best = { p: Float64Array.from(p), sse, label: scored[t].label };
  }

  // ---- (3) polish on the full record
  const polishOptions = {
    lower, upper, maxIterations: coarse === full ? 40 : 10, minDifferenceStep: floors,
    // On the full record a relative SSE change of 1e-8 is far below what the noise can tell apart.
    costTolerance: coarse === full ? 1e-10 : 1e-8,
  };
  let final = levenbergMarquardt(residuals(full), best!.p, full.n, polishOptions);
  evaluations += final.evaluations;
  iterations += final.iterations;
  if (hasFeedthrough) {
    // Now with the exact feed-through, whose cost jumps where θ crosses a sample instant: start
    // in this sample interval and in the neighbouring ones, keep the best.
    sim.interpolateFeedthrough = false;
    const di = info.delayIndex;
    let bestExact: typeof final | null = null;
    for (const shift of [0, -0.5, 0.5, -1, 1]) {
      const p0 = Float64Array.from(final.x);
      p0[di] = Math.min(upper[di], Math.max(lower[di], p0[di] + shift * data.dt));
      const res = levenbergMarquardt(residuals(full), p0, full.n, polishOptions);
      evaluations += res.evaluations;
      iterations += res.iterations;
      if (bestExact === null || res.sse < bestExact.sse) bestExact = res;
    }
    final = bestExact!;
  }
  const values = Array.from(final.x);
  const fixed = values.map((v, i) => isAtBound(v, lower[i], upper[i]));
  let cov: Float64Array | null;
  if (hasFeedthrough && !fixed[info.delayIndex]) {
    cov = feedthroughCovariance(final.jacobian, full.n, np, final.sse, fixed, values, data.dt);
  } else {
    cov = leastSquaresCovariance(final.jacobian, full.n, np, final.sse, fixed);
  }
  // A singular covariance never drops every interval silently: name the parameter(s) responsible,
  // hold them, and keep the others' intervals.
  const undetermined = new Map<number, string>();
  let held = fixed;
  while (cov === null) {
    const c = jacobianConditioning(final.jacobian, full.n, np, held);
    if (c.singular === null) break;
    const who = info.params[c.singular];
    const partners = c.partners.map((j) => info.params[j]);
    undetermined.set(c.singular, partners.length > 0
      ? `the data cannot tell ${who} apart from ${partners.join(', ')} (singular information matrix): no interval for ${who}`
      : `the data do not determine ${who} (singular information matrix): no interval for it`);
    held = held.slice();
    held[c.singular] = true;
    cov = leastSquaresCovariance(final.jacobian, full.n, np, final.sse, held);
  }

  const response = new Float64Array(full.n);
  residuals(full)(final.x, response);
  for (let i = 0; i < full.n; i++) response[i] += full.y[i];
  // The fit figures by their one definition (fit-statistics.ts), on the optimiser's SSE.
  const stats = fitStatistics(full.y, response, final.sse);
  const sse = stats.sse;
  // A noise-free record can fit to rounding: floor the SSE so the criterion stays finite.
  const sseFloor = full.n * (1e-12 * Math.max(yRange, 1e-300)) ** 2;
  const nFree = lagHeld ? np - 1 : np;
  const bic = full.n * Math.log(Math.max(sse, sseFloor) / full.n) + nFree * Math.log(full.n);
  const parameters = describeParameters(kind, values, cov, held, data);
  for (const [j, why] of undetermined) {
    const p = parameters.find((q) => q.name === info.params[j]);
    if (p !== undefined) Object.assign(p, { atBound: fixed[j], stdError: null, ci95: null, undetermined: why });
  }
  return {
    kind,
    values,
    u0: analysis.u0,
    parameters,
    nParams: nFree,
    n: full.n,
    sse,
    rmse: stats.rmse,
    nrmse: stats.nrmse,
    r2: stats.r2,
    bic,
    response,
    covariance: cov === null ? null : Array.from(cov),
    converged: final.converged,
    iterations,
    evaluations,
    start: lagHeld ? `${best!.label}, lag held at 0` : best!.label,
    undetermined: [...undetermined.values()],
  };
}

/**
 * Covariance for K (1 − Tz s) e^{−θs}/(T s + 1). After the delay the step response is
 * K − K A e^{−t/T} with A = (1 + Tz/T) e^{θ/T}: the smooth part fixes only A, so Tz and θ
 * trade against each other exactly, and the data place θ only through the sample at which the
 * jump −K Tz/T first shows, i.e. within one sample interval. So: the least-squares covariance
 * with θ held, then θ uniform over its interval (variance dt²/12) and Tz following it at fixed A,
 * dTz/dθ = −(1 + Tz/T).
 */
function feedthroughCovariance(
  J: Float64Array,
  m: number,
  np: number,
  sse: number,
  fixed: boolean[],
  v: number[],
  dt: number,
): Float64Array | null {
  const held = fixed.slice();
  held[3] = true;
  const cov = leastSquaresCovariance(J, m, np, sse, held);
  if (cov === null) return null;
  const varTheta = (dt * dt) / 12;
  const slope = -(1 + v[2] / v[1]);
  cov[3 * np + 3] = varTheta;
  cov[2 * np + 3] = cov[3 * np + 2] = slope * varTheta;
  cov[2 * np + 2] += slope * slope * varTheta;
  return cov;
}

/** Box for each family: times within the record's reach, damping within [0.05, 30]. */
export function bounds(kind: FitKind, dt: number, duration: number): [Float64Array, Float64Array] {
  const inf = Infinity;
  const tMin = 0.02 * dt;
  const tMax = 20 * duration;
  const dMax = 0.8 * duration;
  switch (kind) {
    case 'first_order':
      return [Float64Array.of(-inf, tMin, 0, -inf), Float64Array.of(inf, tMax, dMax, inf)];
    case 'second_order':
      // shape r ≤ 100 is damping ζ = 1/(2√r) ≥ 0.05.
      return [Float64Array.of(-inf, tMin, 0, 0, -inf), Float64Array.of(inf, tMax, 100, dMax, inf)];
    case 'integrating':
      return [Float64Array.of(-inf, 0, 0, -inf), Float64Array.of(inf, 5 * duration, dMax, inf)];
    case 'inverse_response':
      return [Float64Array.of(-inf, tMin, 0, 0, -inf), Float64Array.of(inf, tMax, tMax, dMax, inf)];
  }
}

export function isAtBound(v: number, lo: number, hi: number): boolean {
  const tol = 1e-9 * Math.max(1, Math.abs(v));
  return (Number.isFinite(lo) && v - lo <= tol) || (Number.isFinite(hi) && hi - v <= tol);
}

/** Starting points; gain and level are filled in by the scoring. */
function candidates(kind: FitKind, ctx: FitContext, duration: number): { p: number[]; label: string }[] {
  const out: { p: number[]; label: string }[] = [];
  const r = ctx.reading;
  const dt = ctx.data.dt;
  const tGrid = geometric(Math.max(dt, duration / 500), duration, 10);
  const dGrid = [0, 0.02, 0.05, 0.1, 0.2, 0.35].map((f) => f * duration);
  const fo = ctx.firstOrder ?? null;
  const foT = fo ? fo.values[1] : r?.smith?.timeConstant ?? duration / 5;
  const foD = fo ? fo.values[2] : Math.max(0, r?.smith?.delay ?? 0);
  switch (kind) {
    case 'first_order': {
      if (r?.smith && r.smith.timeConstant > 0) out.push({ p: [0, r.smith.timeConstant, Math.max(0, r.smith.delay), 0], label: 'Smith two-point' });
      const sk = r?.sundaresanKrishnaswamy;
      if (sk && sk.timeConstant > 0) out.push({ p: [0, sk.timeConstant, Math.max(0, sk.delay), 0], label: 'Sundaresan–Krishnaswamy two-point' });
      for (const T of tGrid) for (const d of dGrid) out.push({ p: [0, T, d, 0], label: 'grid' });
      return out;
    }
    case 'second_order': {
      for (const zeta of [0.3, 0.5, 0.7, 1, 1.5, 3, Infinity]) {
        for (const shift of [0, 0.5, 1]) {
          // Keep the mean residence time θ + a of the first-order fit, moving part of the delay into the lags.
          const d = foD * (1 - shift);
          const a = foT + foD * shift;
          out.push({ p: [0, a, 1 / (4 * zeta * zeta), d, 0], label: fo ? 'from the first-order fit' : 'two-point' });
        }
      }
      for (const T of tGrid) for (const r of [0.25, 1]) out.push({ p: [0, T, r, foD, 0], label: 'grid' });
      return out;
    }
    case 'integrating': {
      for (const T of [0, ...tGrid.slice(0, 6)]) for (const d of dGrid) out.push({ p: [0, T, d, 0], label: 'grid' });
      if (fo) out.push({ p: [0, 0, foD, 0], label: 'from the first-order fit' });
      return out;
    }
    case 'inverse_response': {
      for (const z of [0.02, 0.1, 0.3, 0.6, 1]) {
        out.push({ p: [0, foT, z * foT, foD, 0], label: fo ? 'from the first-order fit' : 'two-point' });
        out.push({ p: [0, foT, z * foT, Math.max(0, foD - z * foT), 0], label: fo ? 'from the first-order fit' : 'two-point' });
      }
      for (const T of tGrid) out.push({ p: [0, T, 0.2 * T, foD, 0], label: 'grid' });
      return out;
    }
  }
}

function geometric(lo: number, hi: number, count: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < count; i++) out.push(lo * Math.pow(hi / lo, i / (count - 1)));
  return out;
}

/**
 * Block-average the input over q samples (the held value over the longer interval) and keep
 * every q-th output sample (the output at the start of each block).
 */
function decimate(s: Series, q: number): Series {
  const n = Math.floor(s.n / q);
  const du = new Float64Array(n);
  const y = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    let acc = 0;
    for (let i = 0; i < q; i++) acc += s.du[j * q + i];
    du[j] = acc / q;
    y[j] = s.y[j * q];
  }
  return { dt: s.dt * q, n, du, y };
}

function rangeOf(a: Float64Array): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < a.length; i++) {
    if (a[i] < lo) lo = a[i];
    if (a[i] > hi) hi = a[i];
  }
  return hi - lo;
}

/** Parameters for reports, with 95 % intervals (± 1.96 σ) and, for derived values, the delta method. */
export function describeParameters(
  kind: FitKind,
  v: number[],
  cov: Float64Array | null,
  fixed: boolean[],
  data: BumpData,
): FittedParameter[] {
  const np = v.length;
  const yName = data.outputName;
  const uName = data.inputName;
  const direct = (name: string, i: number, unit: string): FittedParameter => {
    const se = cov !== null && !fixed[i] ? Math.sqrt(Math.max(cov[i * np + i], 0)) : null;
    return { name, value: v[i], unit, stdError: se, ci95: se === null ? null : [v[i] - 1.96 * se, v[i] + 1.96 * se], atBound: fixed[i], derived: false };
  };
  // Delta method: var g(p) ≈ ∇gᵀ Σ ∇g, gradient by central differences.
  const derived = (name: string, g: (p: number[]) => number, unit: string): FittedParameter => {
    const value = g(v);
    let se: number | null = null;
    if (cov !== null) {
      const grad = new Array<number>(np).fill(0);
      for (let i = 0; i < np; i++) {
        if (fixed[i]) continue;
        const h = 1e-6 * Math.max(Math.abs(v[i]), 1e-9);
        const a = v.slice();
        const b = v.slice();
        a[i] += h;
        b[i] -= h;
        grad[i] = (g(a) - g(b)) / (2 * h);
      }
      let s = 0;
      for (let i = 0; i < np; i++) for (let j = 0; j < np; j++) s += grad[i] * cov[i * np + j] * grad[j];
      se = Number.isFinite(s) ? Math.sqrt(Math.max(s, 0)) : null;
    }
    return { name, value, unit, stdError: se, ci95: se === null ? null : [value - 1.96 * se, value + 1.96 * se], atBound: false, derived: true };
  };
  const gainUnit = `${yName} per ${uName}`;
  switch (kind) {
    case 'first_order':
      return [direct('gain', 0, gainUnit), direct('time_constant', 1, 's'), direct('delay', 2, 's'), direct('level', 3, yName)];
    case 'second_order': {
      // From a = T1 + T2 = 2ζ/ωn and r = T1 T2/a² = 1/(4ζ²).
      if (v[2] <= 0.25) {
        const lag = (sign: number) => (p: number[]): number => (p[1] * (1 + sign * Math.sqrt(Math.max(1 - 4 * p[2], 0)))) / 2;
        const t2 = derived('time_constant_2', lag(-1), 's');
        if (fixed[2]) {
          // The shape sits on its bound r = 0: the second lag is zero and has no interval.
          t2.atBound = true;
          t2.stdError = null;
          t2.ci95 = null;
        }
        return [
          direct('gain', 0, gainUnit),
          derived('time_constant_1', lag(1), 's'),
          t2,
          direct('delay', 3, 's'),
          direct('level', 4, yName),
        ];
      }
      return [
        direct('gain', 0, gainUnit),
        derived('natural_frequency', (p) => 1 / (p[1] * Math.sqrt(p[2])), 'rad/s'),
        derived('damping', (p) => 1 / (2 * Math.sqrt(p[2])), ''),
        direct('delay', 3, 's'),
        direct('level', 4, yName),
      ];
    }
    case 'integrating':
      return [direct('gain', 0, `${yName}/s per ${uName}`), direct('time_constant', 1, 's'), direct('delay', 2, 's'), direct('level', 3, yName)];
    case 'inverse_response':
      return [direct('gain', 0, gainUnit), direct('time_constant', 1, 's'), direct('zero_time_constant', 2, 's'), direct('delay', 3, 's'), direct('level', 4, yName)];
  }
}

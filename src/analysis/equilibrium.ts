/**
 * Operating points of a plant: the steady state (x, u) at which the output equals a target,
 * with the input inside the actuator range.
 *
 * Unknowns z = (x, u); equations F(z) = (f(x, u, d), g(x, u, d) − r) = 0. Newton's method with a
 * central-difference Jacobian (step ∛eps · max(|z_j|, scale_j)), a backtracking line search on
 * ‖F‖ (damping), u projected into [uMin, uMax] after each step, and a Levenberg–Marquardt step
 * when the Jacobian is singular. Several starting points are tried. When the iteration stalls
 * with u on a limit, the target is reported unreachable together with the outputs reachable at
 * the two limits.
 */
import type { PlantDynamics } from '../sim/types.js';
import { luFactor, luSolve } from '../num/index.js';

/** Options of `findEquilibrium` and `steadyStateAtInput`. */
export interface EquilibriumOptions {
  /** Actuator range (−Infinity/Infinity when absent). */
  uMin: number;
  uMax: number;
  /** Disturbance values (default: the plant's d0). */
  d?: Float64Array;
  /** First guess of the state (default x0 of the plant). */
  x0?: Float64Array;
  /** First guess of the input (default mid-range, or 0 for an unbounded actuator). */
  u0?: number;
  /** Iteration cap per start (default 100). */
  maxIterations?: number;
}

/** A found operating point. */
export interface Equilibrium {
  ok: true;
  x: Float64Array;
  u: number;
  y: number;
  /** Largest |dx/dt| left at the solution. */
  residual: number;
  iterations: number;
}

/** Why no operating point was found. */
export interface NoEquilibrium {
  ok: false;
  reason: 'unreachable' | 'singular' | 'no_convergence' | 'non_finite';
  message: string;
  /** Outputs at steady state with u at its minimum and maximum (null where that steady state does not exist). */
  reachable: [number | null, number | null];
}

export type EquilibriumResult = Equilibrium | NoEquilibrium;

const CBRT_EPS = 6.055454452393343e-6;

interface System {
  n: number;
  residual(z: Float64Array, out: Float64Array): void;
  scale: Float64Array;
  /** Index of u in z, or −1 when u is fixed. */
  uIndex: number;
  uMin: number;
  uMax: number;
}

function norm2(v: Float64Array): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i] * v[i];
  return Math.sqrt(s);
}

function allFinite(v: Float64Array): boolean {
  for (let i = 0; i < v.length; i++) if (!Number.isFinite(v[i])) return false;
  return true;
}

type SolveOutcome = { z: Float64Array; converged: boolean; singular: boolean; nonFinite: boolean; iterations: number; fNorm: number };

/** Damped Newton / Levenberg–Marquardt on a square system with u projected into its range. */
function newton(sys: System, z0: Float64Array, maxIter: number, maxRelStep = Infinity): SolveOutcome {
  const n = sys.n;
  const z = Float64Array.from(z0);
  const project = (v: Float64Array): void => {
    if (sys.uIndex >= 0) v[sys.uIndex] = Math.min(sys.uMax, Math.max(sys.uMin, v[sys.uIndex]));
  };
  project(z);
  const f = new Float64Array(n);
  const fp = new Float64Array(n);
  const fm = new Float64Array(n);
  const jac = new Float64Array(n * n);
  const piv = new Int32Array(n);
  const delta = new Float64Array(n);
  const trial = new Float64Array(n);
  const ft = new Float64Array(n);
  sys.residual(z, f);
  if (!allFinite(f)) return { z, converged: false, singular: false, nonFinite: true, iterations: 0, fNorm: NaN };
  let fNorm = norm2(f);
  let singular = false;
  for (let it = 1; it <= maxIter; it++) {
    // Central-difference Jacobian.
    for (let j = 0; j < n; j++) {
      const h = CBRT_EPS * Math.max(Math.abs(z[j]), sys.scale[j]);
      const keep = z[j];
      z[j] = keep + h;
      sys.residual(z, fp);
      z[j] = keep - h;
      sys.residual(z, fm);
      z[j] = keep;
      for (let i = 0; i < n; i++) jac[i * n + j] = (fp[i] - fm[i]) / (2 * h);
    }
    if (!allFinite(jac)) return { z, converged: false, singular, nonFinite: true, iterations: it, fNorm };
    const lu = Float64Array.from(jac);
    const cond = luFactor(lu, n, piv);
    if (cond > 1e-13) {
      for (let i = 0; i < n; i++) delta[i] = -f[i];
      luSolve(lu, n, piv, delta);
    } else {
      // Levenberg–Marquardt: (JᵀJ + μ I) δ = −Jᵀ F, μ relative to the largest diagonal entry.
      singular = true;
      const jtj = new Float64Array(n * n);
      let maxDiag = 0;
      for (let a = 0; a < n; a++) {
        for (let b = 0; b < n; b++) {
          let s = 0;
          for (let i = 0; i < n; i++) s += jac[i * n + a] * jac[i * n + b];
          jtj[a * n + b] = s;
        }
        maxDiag = Math.max(maxDiag, jtj[a * n + a]);
        let g = 0;
        for (let i = 0; i < n; i++) g -= jac[i * n + a] * f[i];
        delta[a] = g;
      }
      const mu = 1e-8 * (maxDiag > 0 ? maxDiag : 1);
      for (let a = 0; a < n; a++) jtj[a * n + a] += mu;
      if (!(luFactor(jtj, n, piv) > 0)) return { z, converged: false, singular: true, nonFinite: false, iterations: it, fNorm };
      luSolve(jtj, n, piv, delta);
    }
    // Optional trust limit: no variable moves by more than maxRelStep of its size per iteration
    // (keeps the iterate out of regions where a kink such as max(h, 0) flattens the model).
    let lambda = 1;
    if (Number.isFinite(maxRelStep)) {
      let worst = 0;
      for (let i = 0; i < n; i++) worst = Math.max(worst, Math.abs(delta[i]) / Math.max(Math.abs(z[i]), sys.scale[i]));
      if (worst > maxRelStep) lambda = maxRelStep / worst;
    }
    // Backtracking line search on ‖F‖.
    let accepted = false;
    let tNorm = fNorm;
    for (let k = 0; k < 30; k++) {
      for (let i = 0; i < n; i++) trial[i] = z[i] + lambda * delta[i];
      project(trial);
      sys.residual(trial, ft);
      tNorm = norm2(ft);
      if (Number.isFinite(tNorm) && tNorm <= (1 - 1e-4 * lambda) * fNorm) {
        accepted = true;
        break;
      }
      lambda *= 0.5;
    }
    let stepSize = 0;
    for (let i = 0; i < n; i++) stepSize = Math.max(stepSize, Math.abs(trial[i] - z[i]) / Math.max(Math.abs(z[i]), sys.scale[i]));
    // No decrease possible: either at the solution (rounding level) or stuck; the caller checks which.
    if (!accepted) return { z, converged: true, singular, nonFinite: false, iterations: it, fNorm };
    z.set(trial);
    f.set(ft);
    fNorm = tNorm;
    if (fNorm === 0 || stepSize < 1e-12) return { z, converged: true, singular, nonFinite: false, iterations: it, fNorm };
  }
  return { z, converged: false, singular, nonFinite: false, iterations: maxIter, fNorm };
}

function defaultU(o: EquilibriumOptions): number {
  if (o.u0 !== undefined && Number.isFinite(o.u0)) return Math.min(o.uMax, Math.max(o.uMin, o.u0));
  if (Number.isFinite(o.uMin) && Number.isFinite(o.uMax)) return 0.5 * (o.uMin + o.uMax);
  if (Number.isFinite(o.uMin)) return Math.max(o.uMin, 0);
  if (Number.isFinite(o.uMax)) return Math.min(o.uMax, 0);
  return 0;
}

function stateScale(plant: PlantDynamics, x0: Float64Array): Float64Array {
  const s = new Float64Array(plant.nx);
  for (let i = 0; i < plant.nx; i++) s[i] = Math.max(Math.abs(x0[i]), Math.abs(plant.x0[i]), 1e-3);
  return s;
}

/** Accept only a point whose state derivatives are small against the state scale per second. */
function derivativeResidual(plant: PlantDynamics, x: Float64Array, u: number, d: Float64Array): number {
  const dx = new Float64Array(plant.nx);
  plant.deriv(0, x, u, d, plant.params, dx);
  let r = 0;
  for (let i = 0; i < plant.nx; i++) r = Math.max(r, Math.abs(dx[i]));
  return r;
}

/**
 * Steady state with the input held at u: solves f(x, u, d) = 0 for x. Returns null when there is
 * none (an integrating plant away from balance, or no convergence).
 */
export function steadyStateAtInput(plant: PlantDynamics, u: number, options: EquilibriumOptions): { x: Float64Array; y: number } | null {
  const d = options.d ?? plant.d0;
  const x0 = options.x0 ?? plant.x0;
  const n = plant.nx;
  if (n === 0) return { x: new Float64Array(0), y: plant.output(0, new Float64Array(0), u, d, plant.params) };
  const sys: System = {
    n,
    residual: (z, out) => plant.deriv(0, z, u, d, plant.params, out),
    scale: stateScale(plant, x0),
    uIndex: -1,
    uMin: options.uMin,
    uMax: options.uMax,
  };
  for (const limit of [Infinity, 0.5]) {
    const r = newton(sys, x0, options.maxIterations ?? 100, limit);
    if (!r.converged || r.nonFinite || !allFinite(r.z)) continue;
    if (!acceptable(plant, r.z, u, d, sys.scale)) continue;
    return { x: r.z, y: plant.output(0, r.z, u, d, plant.params) };
  }
  return null;
}

function acceptable(plant: PlantDynamics, x: Float64Array, u: number, d: Float64Array, scale: Float64Array): boolean {
  const dx = new Float64Array(plant.nx);
  plant.deriv(0, x, u, d, plant.params, dx);
  for (let i = 0; i < plant.nx; i++) {
    // |dx_i/dt| tiny against the state's own size per unit time: 1e-9 of the scale per second.
    if (!(Math.abs(dx[i]) <= 1e-9 * Math.max(Math.abs(x[i]), scale[i]))) return false;
  }
  return true;
}

/**
 * Operating point with output `target` and the input within [uMin, uMax]. Never throws for a
 * plant that has none: the result says why.
 */
export function findEquilibrium(plant: PlantDynamics, target: number, options: EquilibriumOptions): EquilibriumResult {
  const d = options.d ?? plant.d0;
  const x0 = options.x0 ?? plant.x0;
  const n = plant.nx;
  const uRange = Number.isFinite(options.uMax - options.uMin) ? options.uMax - options.uMin : Math.max(1, Math.abs(defaultU(options)));
  const scale = new Float64Array(n + 1);
  scale.set(stateScale(plant, x0));
  scale[n] = Math.max(uRange, 1e-9);
  const outScale = Math.max(Math.abs(target), 1e-9);
  const xs = new Float64Array(n);
  const sys: System = {
    n: n + 1,
    residual: (z, out) => {
      for (let i = 0; i < n; i++) xs[i] = z[i];
      plant.deriv(0, xs, z[n], d, plant.params, out);
      out[n] = plant.output(0, xs, z[n], d, plant.params) - target;
    },
    scale,
    uIndex: n,
    uMin: options.uMin,
    uMax: options.uMax,
  };
  if (!Number.isFinite(target)) {
    return { ok: false, reason: 'non_finite', message: `operating point ${target} is not a number`, reachable: [null, null] };
  }
  const starts: number[] = [defaultU(options)];
  if (Number.isFinite(options.uMin) && Number.isFinite(options.uMax)) {
    for (const f of [0.25, 0.75, 0.05, 0.95]) starts.push(options.uMin + f * (options.uMax - options.uMin));
  }
  let sawSingular = false;
  let sawNonFinite = false;
  let atLimit = false;
  const maxIter = options.maxIterations ?? 100;
  for (const u0 of starts) {
    const candidates: Float64Array[] = [];
    const z0 = new Float64Array(n + 1);
    z0.set(x0);
    z0[n] = u0;
    candidates.push(z0);
    // Second guess: the steady state at this input, then solve for the output.
    const ss = steadyStateAtInput(plant, u0, { ...options, d, x0 });
    if (ss !== null) {
      const z1 = new Float64Array(n + 1);
      z1.set(ss.x);
      z1[n] = u0;
      candidates.push(z1);
    }
    for (const [start, limit] of candidates.flatMap((c) => [[c, Infinity], [c, 0.5]] as [Float64Array, number][])) {
      const r = newton(sys, start, maxIter, limit);
      sawSingular ||= r.singular;
      sawNonFinite ||= r.nonFinite;
      const x = r.z.subarray(0, n).slice();
      const u = r.z[n];
      if (!allFinite(r.z)) continue;
      const y = plant.output(0, x, u, d, plant.params);
      const okOut = Math.abs(y - target) <= 1e-7 * Math.max(outScale, 1e-6) + 1e-12;
      if (r.converged && okOut && acceptable(plant, x, u, d, scale)) {
        return { ok: true, x, u, y, residual: derivativeResidual(plant, x, u, d), iterations: r.iterations };
      }
      if (u <= options.uMin || u >= options.uMax) atLimit = true;
    }
  }
  const lo = Number.isFinite(options.uMin) ? steadyStateAtInput(plant, options.uMin, { ...options, d, x0 }) : null;
  const hi = Number.isFinite(options.uMax) ? steadyStateAtInput(plant, options.uMax, { ...options, d, x0 }) : null;
  const reachable: [number | null, number | null] = [lo?.y ?? null, hi?.y ?? null];
  const fmt = (v: number | null): string => (v === null ? 'none' : v.toPrecision(4));
  if (atLimit && (lo !== null || hi !== null)) {
    return {
      ok: false,
      reason: 'unreachable',
      message: `no steady state with output ${target} inside the actuator range [${options.uMin}, ${options.uMax}]; steady outputs at the limits: ${fmt(reachable[0])} and ${fmt(reachable[1])}`,
      reachable,
    };
  }
  if (sawNonFinite) {
    return { ok: false, reason: 'non_finite', message: 'the model produced a non-finite value while searching for the operating point', reachable };
  }
  if (sawSingular) {
    return {
      ok: false,
      reason: 'singular',
      message: `the steady-state equations are singular near output ${target} (the output may not depend on the input, or the plant has no steady state there)`,
      reachable,
    };
  }
  if (atLimit) {
    return {
      ok: false,
      reason: 'unreachable',
      message: `no steady state with output ${target} inside the actuator range [${options.uMin}, ${options.uMax}]`,
      reachable,
    };
  }
  return { ok: false, reason: 'no_convergence', message: `no operating point with output ${target} was found`, reachable };
}

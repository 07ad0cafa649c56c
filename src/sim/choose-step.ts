/**
 * Automatic choice of the integration step from an estimate of the plant's fastest mode.
 */
import type { IntegratorName } from '../model/types.js';
import { eigenvalues } from '../num/index.js';
import { STABILITY_LIMIT } from './generate-stepper.js';
import type { PlantDynamics } from './types.js';

/**
 * Target h·ρ for each method. Well inside the real-axis stability limit and small enough that
 * the local error on the fastest mode stays near 1e-5 (RK4: (hρ)^5/120 ≈ 8e-6 at 0.25;
 * Heun: (hρ)^3/6 ≈ 1.7e-4 at 0.1; Euler: (hρ)^2/2 = 2e-4 at 0.02). Common practice, no source.
 */
const TARGET_H_RHO: Readonly<Record<IntegratorName, number>> = Object.freeze({ rk4: 0.25, heun: 0.1, euler: 0.02 });

/** Upper bound on substeps per controller sample for an automatic step (keeps runs bounded). */
export const MAX_SUBSTEPS = 10000;

/** Result of `chooseStep`. */
export interface StepChoice {
  /** Integration step, s; sampleTime / h is the integer `substeps`. */
  step: number;
  substeps: number;
  /** Estimated spectral radius of the Jacobian at the initial point, 1/s. */
  rho: number;
  /** h·ρ. */
  hRho: number;
  warnings: string[];
}

/**
 * Spectral radius of a dense row-major n×n matrix: the largest |λ| from num/'s eigenvalue solver
 * (balancing + Hessenberg + Francis QR). If that fails (no convergence) the Gershgorin bound
 * min(max row sum, max column sum of |a_ij|) is returned instead: a true upper bound, so the
 * step chosen from it is never too large.
 */
export function spectralRadiusEstimate(a: Float64Array, n: number): number {
  let rows = 0;
  let cols = 0;
  for (let i = 0; i < n; i++) {
    let r = 0;
    let c = 0;
    for (let j = 0; j < n; j++) {
      r += Math.abs(a[i * n + j]);
      c += Math.abs(a[j * n + i]);
    }
    rows = Math.max(rows, r);
    cols = Math.max(cols, c);
  }
  const gersh = Math.min(rows, cols);
  if (!(gersh > 0)) return gersh;
  try {
    const ev = eigenvalues(a, n);
    let rho = 0;
    for (let i = 0; i < n; i++) rho = Math.max(rho, Math.hypot(ev.re[i], ev.im[i]));
    return Number.isFinite(rho) ? Math.min(rho, gersh) : gersh;
  } catch {
    return gersh;
  }
}

/**
 * Numerical Jacobian ∂f/∂x (row-major) at (t, x, u, d) by central differences.
 */
export function numericalJacobian(
  plant: PlantDynamics,
  x: Float64Array,
  u: number,
  d: Float64Array,
  t = 0,
): Float64Array {
  const n = plant.nx;
  const jac = new Float64Array(n * n);
  const xp = Float64Array.from(x);
  const fp = new Float64Array(n);
  const fm = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const dx = 1e-6 * Math.max(1, Math.abs(x[j]));
    xp[j] = x[j] + dx;
    plant.deriv(t, xp, u, d, plant.params, fp);
    xp[j] = x[j] - dx;
    plant.deriv(t, xp, u, d, plant.params, fm);
    xp[j] = x[j];
    for (let i = 0; i < n; i++) jac[i * n + j] = (fp[i] - fm[i]) / (2 * dx);
  }
  return jac;
}

/**
 * Estimate the fastest mode of the plant: exact A for linear kinds, else the numerical Jacobian
 * at the initial state with input `u`. Non-finite entries (e.g. sqrt at 0) count as Infinity.
 * Remembered per plant object (checked against copies of the numbers it depends on), because
 * every run of a loop asks for it and a sweep or an optimiser runs the same plant many times.
 */
export function fastestMode(plant: PlantDynamics, u = 0): number {
  if (plant.nx === 0) return 0;
  const memo = recall(plant, u);
  if (memo !== null) return memo;
  const a = plant.linear !== null ? plant.linear.a : numericalJacobian(plant, plant.x0, u, plant.d0);
  let rho = NaN;
  for (let i = 0; i < a.length; i++) {
    if (!Number.isFinite(a[i])) {
      rho = Infinity;
      break;
    }
  }
  if (rho !== Infinity) rho = spectralRadiusEstimate(a, plant.nx);
  store(plant, u, rho);
  return rho;
}

/** What `fastestMode` depended on, copied, and its answer. */
interface ModeMemo {
  u: number;
  x0: Float64Array;
  params: Float64Array;
  d0: Float64Array;
  a: Float64Array | null;
  deriv: PlantDynamics['deriv'];
  rho: number;
}

const MEMO_PER_PLANT = 4;
const modeMemo = new WeakMap<PlantDynamics, ModeMemo[]>();

function sameNumbers(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) return false;
  return true;
}

function recall(plant: PlantDynamics, u: number): number | null {
  const list = modeMemo.get(plant);
  if (list === undefined) return null;
  const a = plant.linear !== null ? plant.linear.a : null;
  for (const m of list) {
    if (!Object.is(m.u, u) || m.deriv !== plant.deriv || (m.a === null) !== (a === null)) continue;
    if (a !== null && m.a !== null && !sameNumbers(m.a, a)) continue;
    if (sameNumbers(m.x0, plant.x0) && sameNumbers(m.params, plant.params) && sameNumbers(m.d0, plant.d0)) return m.rho;
  }
  return null;
}

function store(plant: PlantDynamics, u: number, rho: number): void {
  let list = modeMemo.get(plant);
  if (list === undefined) {
    list = [];
    modeMemo.set(plant, list);
  }
  if (list.length >= MEMO_PER_PLANT) list.shift();
  list.push({
    u,
    x0: Float64Array.from(plant.x0),
    params: Float64Array.from(plant.params),
    d0: Float64Array.from(plant.d0),
    a: plant.linear !== null ? Float64Array.from(plant.linear.a) : null,
    deriv: plant.deriv,
    rho,
  });
}

/** Warning text when h·ρ is outside the method's real-axis stability interval, else null. */
export function stabilityWarning(integrator: IntegratorName, h: number, rho: number): string | null {
  const limit = STABILITY_LIMIT[integrator];
  if (h * rho > limit) {
    return (
      `integration step ${h} s times the fastest mode ${rho.toPrecision(4)} 1/s is ${(h * rho).toPrecision(4)}, ` +
      `outside the ${integrator} stability limit ${limit.toPrecision(4)}: the run may diverge numerically`
    );
  }
  return null;
}

/**
 * Choose the integration step: h·ρ near the method's target (see TARGET_H_RHO), then rounded
 * down so that sampleTime / h is an integer; at most one step per sample and at most
 * MAX_SUBSTEPS substeps per sample.
 *
 * @param sampleTime controller sample time, s
 * @param u input used for the Jacobian of a nonlinear plant (default 0)
 */
export function chooseStep(plant: PlantDynamics, sampleTime: number, integrator: IntegratorName, u = 0): StepChoice {
  if (!(sampleTime > 0) || !Number.isFinite(sampleTime)) throw new RangeError('sampleTime must be positive');
  if (!(integrator in STABILITY_LIMIT)) throw new RangeError(`unknown integrator ${String(integrator)}`);
  const rho = fastestMode(plant, u);
  const warnings: string[] = [];
  let substeps = 1;
  if (rho > 0) {
    const want = Number.isFinite(rho) ? Math.ceil((sampleTime * rho) / TARGET_H_RHO[integrator]) : MAX_SUBSTEPS;
    substeps = Math.max(1, Math.min(MAX_SUBSTEPS, want));
    if (want > MAX_SUBSTEPS) {
      warnings.push(`fastest mode ${rho.toPrecision(4)} 1/s needs more than ${MAX_SUBSTEPS} steps per sample; capped`);
    }
  }
  const step = sampleTime / substeps;
  const w = Number.isFinite(rho) ? stabilityWarning(integrator, step, rho) : null;
  if (w !== null) warnings.push(w);
  return { step, substeps, rho, hRho: step * rho, warnings };
}

/**
 * Round a requested step so that it divides the sample time: substeps = max(1, round(Ts/h)).
 */
export function roundStep(sampleTime: number, step: number): { step: number; substeps: number } {
  const substeps = Math.max(1, Math.round(sampleTime / step));
  return { step: sampleTime / substeps, substeps };
}

/**
 * The engine's step for a loop: the loop's own step rounded to divide the sample time (with a
 * note when rounding changed it and a stability warning from the fastest mode at `uStart`), or,
 * when the loop leaves it open (step <= 0 or not finite), `chooseStep` at `uStart`.
 * Shared by `Simulation` and the batch runner so that both take the same step.
 */
export function loopStep(
  plant: PlantDynamics,
  sampleTime: number,
  requested: number,
  integrator: IntegratorName,
  uStart: number,
): { step: number; substeps: number; warnings: string[] } {
  const warnings: string[] = [];
  if (requested > 0 && Number.isFinite(requested)) {
    const rounded = roundStep(sampleTime, requested);
    if (Math.abs(rounded.step - requested) > 1e-9 * requested) {
      warnings.push(`integration step ${requested} s rounded to ${rounded.step} s to divide the sample time`);
    }
    const w = stabilityWarning(integrator, rounded.step, fastestMode(plant, uStart));
    if (w !== null) warnings.push(w);
    return { step: rounded.step, substeps: rounded.substeps, warnings };
  }
  const c = chooseStep(plant, sampleTime, integrator, uStart);
  for (const w of c.warnings) warnings.push(w);
  return { step: c.step, substeps: c.substeps, warnings };
}

/**
 * Linearisation of a plant at an operating point: A = ∂f/∂x, B = ∂f/∂u, C = ∂g/∂x, D = ∂g/∂u by
 * central differences with the step ∛eps · max(|v|, scale) per variable (truncation and rounding
 * errors balanced for a second-order formula), and the plant's input delay. Linear kinds are
 * returned exactly (PlantDynamics.linear).
 */
import type { LinearModel, PlantDynamics } from '../sim/types.js';

const CBRT_EPS = 6.055454452393343e-6;

/** Options of `linearise`. */
export interface LineariseOptions {
  /** Disturbance values (default d0). */
  d?: Float64Array;
  /** Typical size of each state (default max(|x|, |x0|, 1e-3)). */
  stateScale?: ArrayLike<number>;
  /** Typical size of the input (default max(|u|, 1e-3)); the actuator range is a good choice. */
  inputScale?: number;
  /** Use the exact model of a linear kind (default true). */
  exact?: boolean;
}

/** A linearisation, or the reason it could not be formed. */
export type LinearisationResult =
  | { ok: true; model: LinearModel; exact: boolean }
  | { ok: false; message: string };

/** Linearise `plant` at (x, u). Never throws for a bad model: a non-finite entry is reported. */
export function linearise(plant: PlantDynamics, x: Float64Array, u: number, options: LineariseOptions = {}): LinearisationResult {
  if ((options.exact ?? true) && plant.linear !== null) return { ok: true, model: plant.linear, exact: true };
  const n = plant.nx;
  const d = options.d ?? plant.d0;
  const p = plant.params;
  const a = new Float64Array(n * n);
  const b = new Float64Array(n);
  const c = new Float64Array(n);
  const fp = new Float64Array(n);
  const fm = new Float64Array(n);
  const xw = Float64Array.from(x);
  const bad: string[] = [];
  for (let j = 0; j < n; j++) {
    const typical = options.stateScale?.[j] ?? Math.max(Math.abs(plant.x0[j]), 1e-3);
    const h = CBRT_EPS * Math.max(Math.abs(x[j]), typical);
    xw[j] = x[j] + h;
    plant.deriv(0, xw, u, d, p, fp);
    const yp = plant.output(0, xw, u, d, p);
    xw[j] = x[j] - h;
    plant.deriv(0, xw, u, d, p, fm);
    const ym = plant.output(0, xw, u, d, p);
    xw[j] = x[j];
    for (let i = 0; i < n; i++) a[i * n + j] = (fp[i] - fm[i]) / (2 * h);
    c[j] = (yp - ym) / (2 * h);
  }
  const hu = CBRT_EPS * Math.max(Math.abs(u), options.inputScale ?? 1e-3);
  plant.deriv(0, xw, u + hu, d, p, fp);
  const yp = plant.output(0, xw, u + hu, d, p);
  plant.deriv(0, xw, u - hu, d, p, fm);
  const ym = plant.output(0, xw, u - hu, d, p);
  for (let i = 0; i < n; i++) b[i] = (fp[i] - fm[i]) / (2 * hu);
  const dd = (yp - ym) / (2 * hu);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) if (!Number.isFinite(a[i * n + j])) bad.push(`A[${plant.stateNames[i]}, ${plant.stateNames[j]}]`);
    if (!Number.isFinite(b[i])) bad.push(`B[${plant.stateNames[i]}]`);
    if (!Number.isFinite(c[i])) bad.push(`C[${plant.stateNames[i]}]`);
  }
  if (!Number.isFinite(dd)) bad.push('D');
  if (bad.length > 0) {
    return { ok: false, message: `the linearisation has non-finite entries (${bad.join(', ')}): the model is not differentiable at the operating point` };
  }
  return { ok: true, model: { nx: n, a, b, c, d: dd, delay: plant.inputDelay }, exact: false };
}

/**
 * The linear model the rules and the margin checks use: exact for the linear kinds, and for an
 * ode plant the linearisation at the trial's starting point (initial state, initial output),
 * which a well-formed plant file sets at an equilibrium.
 */
import type { PlantSpec } from '../model/types.js';
import { numericalJacobian, type LinearModel, type PlantDynamics } from '../sim/index.js';

/** Result of `operatingPointModel`. */
export interface OperatingPointModel {
  model: LinearModel | null;
  notes: string[];
}

/**
 * Linear model at the operating point. For ode plants: central differences of f and g in x and u
 * at (x0, u0, d0), u0 = the trial's initial output (else 0). A start that is not an equilibrium
 * (|dx/dt| not small against the state's scale over the trial) is noted, not refused.
 */
export function operatingPointModel(spec: PlantSpec, dyn: PlantDynamics): OperatingPointModel {
  if (dyn.linear !== null) return { model: dyn.linear, notes: [] };
  const notes: string[] = [];
  const n = dyn.nx;
  const x = Float64Array.from(dyn.x0);
  const d = Float64Array.from(dyn.d0);
  const u = spec.loop.trial.initialOutput ?? 0;
  const p = dyn.params;
  const a = numericalJacobian(dyn, x, u, d);
  const b = new Float64Array(n);
  const c = new Float64Array(n);
  const fp = new Float64Array(n);
  const fm = new Float64Array(n);
  const du = 1e-6 * Math.max(1, Math.abs(u));
  dyn.deriv(0, x, u + du, d, p, fp);
  dyn.deriv(0, x, u - du, d, p, fm);
  for (let i = 0; i < n; i++) b[i] = (fp[i] - fm[i]) / (2 * du);
  const dd = (dyn.output(0, x, u + du, d, p) - dyn.output(0, x, u - du, d, p)) / (2 * du);
  for (let j = 0; j < n; j++) {
    const h = 1e-6 * Math.max(1, Math.abs(x[j]));
    const xj = x[j];
    x[j] = xj + h;
    const yp = dyn.output(0, x, u, d, p);
    x[j] = xj - h;
    const ym = dyn.output(0, x, u, d, p);
    x[j] = xj;
    c[j] = (yp - ym) / (2 * h);
  }
  let finite = true;
  for (const v of [...a, ...b, ...c, dd]) if (!Number.isFinite(v)) finite = false;
  if (!finite) {
    notes.push('the plant could not be linearised at its initial state (non-finite derivative)');
    return { model: null, notes };
  }
  dyn.deriv(0, x, u, d, p, fp);
  let drift = 0;
  for (let i = 0; i < n; i++) drift = Math.max(drift, (Math.abs(fp[i]) * spec.loop.trial.duration) / Math.max(1, Math.abs(x[i])));
  if (drift > 0.05) {
    notes.push('the initial state is not an equilibrium at the initial output: the linear model is only indicative');
  }
  return { model: { nx: n, a, b, c, d: dd, delay: dyn.inputDelay }, notes };
}

/**
 * The linear model the rules and the margin checks use: exact for the linear kinds, and for an
 * ode plant analysis' linearisation at the trial's starting point (initial state, initial
 * output), which a well-formed plant file sets at an equilibrium.
 */
import { linearise } from '../analysis/index.js';
import type { PlantSpec } from '../model/types.js';
import type { LinearModel, PlantDynamics } from '../sim/index.js';

/** Result of `operatingPointModel`. */
export interface OperatingPointModel {
  model: LinearModel | null;
  notes: string[];
}

/**
 * Linear model at the operating point (x0, u0 = the trial's initial output, else 0, d0). A start
 * that is not an equilibrium (the state would drift by more than 5 % of its size over the trial)
 * is noted, not refused.
 */
export function operatingPointModel(spec: PlantSpec, dyn: PlantDynamics): OperatingPointModel {
  if (dyn.linear !== null) return { model: dyn.linear, notes: [] };
  const notes: string[] = [];
  const u = spec.loop.trial.initialOutput ?? 0;
  const span = spec.actuator.max - spec.actuator.min;
  const lin = linearise(dyn, dyn.x0, u, Number.isFinite(span) && span > 0 ? { inputScale: span } : {});
  if (!lin.ok) {
    notes.push(`the plant could not be linearised at its initial state: ${lin.message}`);
    return { model: null, notes };
  }
  const n = dyn.nx;
  const f = new Float64Array(n);
  dyn.deriv(0, dyn.x0, u, dyn.d0, dyn.params, f);
  let drift = 0;
  for (let i = 0; i < n; i++) {
    drift = Math.max(drift, (Math.abs(f[i]) * spec.loop.trial.duration) / Math.max(1, Math.abs(dyn.x0[i])));
  }
  if (drift > 0.05) notes.push('the initial state is not an equilibrium at the initial output: the linear model is only indicative');
  return { model: lin.model, notes };
}

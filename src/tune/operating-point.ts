/**
 * The linear model the rules and the margin checks use: exact for the linear kinds, and for an
 * ode plant analysis' linearisation at the trial's starting point (initial state, initial
 * output), which is the loop's settled start (loop/'s settledStart) unless the file asks for rest
 * or no steady state exists.
 */
import { linearise } from '../analysis/index.js';
import type { PlantSpec } from '../model/types.js';
import type { LinearModel, PlantDynamics, StartPoint } from '../sim/index.js';

/** Result of `operatingPointModel`. */
export interface OperatingPointModel {
  model: LinearModel | null;
  notes: string[];
}

/**
 * Linear model at the loop's start (state and actuator position there, d0). A start that is not
 * an equilibrium (the state would drift by more than 5 % of its size over the trial)
 * is noted, not refused.
 */
export function operatingPointModel(spec: PlantSpec, dyn: PlantDynamics, start: StartPoint): OperatingPointModel {
  if (dyn.linear !== null) return { model: dyn.linear, notes: [] };
  const notes: string[] = [];
  const { x, u } = start;
  const span = spec.actuator.max - spec.actuator.min;
  const lin = linearise(dyn, x, u, Number.isFinite(span) && span > 0 ? { inputScale: span } : {});
  if (!lin.ok) {
    notes.push(`the plant could not be linearised at its initial state: ${lin.message}`);
    return { model: null, notes };
  }
  const n = dyn.nx;
  const f = new Float64Array(n);
  dyn.deriv(0, x, u, dyn.d0, dyn.params, f);
  let drift = 0;
  for (let i = 0; i < n; i++) {
    drift = Math.max(drift, (Math.abs(f[i]) * spec.loop.trial.duration) / Math.max(1, Math.abs(x[i])));
  }
  if (drift > 0.05) notes.push('the trial does not start at an equilibrium: the linear model is only indicative');
  return { model: lin.model, notes };
}

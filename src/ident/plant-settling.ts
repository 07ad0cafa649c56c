/**
 * How long a plant file's model needs to settle after an input move at the log's operating
 * point: dead time (input and sensor) plus 4 time constants of its slowest mode (98 %, the
 * same reading `identify` uses for a fitted model's settle time). The slowest mode is the
 * smallest |Re p| over the poles of the linearisation at the steady state of the first logged
 * input (the model's own poles for a linear kind). Null when the model integrates or has an
 * unstable mode (it never settles) or cannot be linearised there.
 */
import { linearise, poles, steadyStateAtInput } from '../analysis/index.js';
import type { PlantSpec } from '../model/types.js';
import type { PlantDynamics } from '../sim/index.js';

/** Settling time of `dynamics` after a move from input `u`, s; null when it does not settle. */
export function plantSettlingTime(spec: PlantSpec, dynamics: PlantDynamics, u: number): number | null {
  let x = dynamics.x0;
  if (dynamics.linear === null) {
    const ss = steadyStateAtInput(dynamics, u, { uMin: -Infinity, uMax: Infinity });
    if (ss === null) return null;
    x = ss.x;
  }
  const lin = linearise(dynamics, x, u);
  if (!lin.ok) return null;
  const model = lin.model;
  if (model.nx === 0) return dynamics.inputDelay + spec.sensor.delay;
  let slowest = Infinity;
  for (const p of poles(model)) {
    // A pole on or right of the axis (to rounding) never settles.
    if (!(p.re < -1e-9 * Math.max(1, Math.abs(p.im)))) return null;
    slowest = Math.min(slowest, -p.re);
  }
  return dynamics.inputDelay + spec.sensor.delay + 4 / slowest;
}

/**
 * Linear plants have no initial state in their file (they are written in whatever variables the
 * user chose), so a trial that names an initial controller output starts them in the steady state
 * that output holds: A x = −B (u0 + load). A plant whose A is singular (an integrator) has no such
 * state for a non-zero input and starts at rest, as before.
 */
import { solve } from '../num/index.js';
import type { PlantDynamics } from './types.js';

/** The plant with x0 moved to the steady state of a constant input u0, or the plant unchanged. */
export function steadyStart(plant: PlantDynamics, u0: number | null): PlantDynamics {
  const lin = plant.linear;
  if (lin === null || u0 === null || !Number.isFinite(u0) || lin.nx === 0) return plant;
  if (plant.x0.some((v) => v !== 0)) return plant;
  const w = u0 + (plant.d0.length > 0 ? plant.d0[0] : 0);
  if (w === 0) return plant;
  const rhs = new Float64Array(lin.nx);
  for (let i = 0; i < lin.nx; i++) rhs[i] = -lin.b[i] * w;
  const x = solve(lin.a, lin.nx, rhs, 1e-12);
  if (x === null || x.some((v) => !Number.isFinite(v))) return plant;
  return { ...plant, x0: x };
}

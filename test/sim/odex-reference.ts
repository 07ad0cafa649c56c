/**
 * Reference integration of any PlantDynamics with the `odex` package (Hairer & Wanner's ODEX
 * Gragg–Bulirsch–Stoer extrapolation code, ported to JavaScript), for comparison with the
 * engine's fixed-step RK4. Reusable for compiled plant files (compilePlant output).
 */
import { createRequire } from 'node:module';
import type { PlantDynamics } from '../../src/sim/index.js';

/** The part of odex's API used here. */
interface OdexSolver {
  relativeTolerance: number;
  absoluteTolerance: number;
  maxSteps: number;
  solve(f: (x: number, y: number[]) => number[], x0: number, y0: number[], xEnd: number): { y: number[]; outcome: number };
}

// Loaded through require with a local type: importing 'odex' by name makes TypeScript type-check
// the package's own .ts source under this project's strict settings, which it does not pass.
const odex = createRequire(import.meta.url)('odex') as { Solver: new (n: number) => OdexSolver };

/**
 * Outputs y(times[i]) of the open-loop plant with a piecewise-constant input: u = input(t) held
 * from each time to the next. Integrates segment by segment (restarting at every time), so input
 * changes never fall inside an extrapolation step. rtol = atol = `tol`.
 */
export function odexOutputs(
  plant: PlantDynamics,
  times: readonly number[],
  input: (t: number) => number,
  tol = 1e-12,
): number[] {
  const solver = new odex.Solver(plant.nx);
  solver.relativeTolerance = tol;
  solver.absoluteTolerance = tol;
  solver.maxSteps = 100000;
  const xs = new Float64Array(plant.nx);
  const dx = new Float64Array(plant.nx);
  const d = Float64Array.from(plant.d0);
  let y = Array.from(plant.x0);
  const out: number[] = [];
  const u0 = input(times[0]);
  out.push(plant.output(times[0], plant.x0, u0, d, plant.params));
  for (let i = 1; i < times.length; i++) {
    const u = input(times[i - 1]);
    const f = (t: number, v: number[]): number[] => {
      for (let k = 0; k < v.length; k++) xs[k] = v[k];
      plant.deriv(t, xs, u, d, plant.params, dx);
      return Array.from(dx);
    };
    const res = solver.solve(f, times[i - 1], y, times[i]);
    if (res.outcome !== 0) throw new Error(`odex did not converge on [${times[i - 1]}, ${times[i]}]`);
    y = res.y;
    for (let k = 0; k < y.length; k++) xs[k] = y[k];
    out.push(plant.output(times[i], xs, u, d, plant.params));
  }
  return out;
}

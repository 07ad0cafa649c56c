/**
 * The plant state a trial starts from. A linear model kind is written in deviation variables
 * (rest = zero state), so a trial that starts with the actuator at `initial_output` (or with a
 * load in force) starts where that input has settled: x = −A⁻¹ B (u₀ + load₀), the operating point
 * the practitioner means by "the valve is at 0.5", and not a step from rest at t = 0. A model
 * that integrates (A singular) has no such point and starts at rest, with a warning. `start:
 * rest` asks for the zero state (the initial output is then a step at t = 0, the classic
 * open-loop test). Ode plants start from the initial states their file gives.
 */
import { solve } from '../num/index.js';
import type { TrialStart } from '../model/types.js';
import { Actuator, valveInput } from './actuator.js';
import type { LoopConfig, PlantDynamics } from './types.js';

/** The start state and, when it is not the steady state asked for, why. */
export function startState(plant: PlantDynamics, uStart: number, start: TrialStart = 'steady'): { x: Float64Array; warning: string | null } {
  const x = Float64Array.from(plant.x0);
  const lin = plant.linear;
  if (start === 'rest' || lin === null || lin.nx === 0) return { x, warning: null };
  const at = plant.disturbanceNames.indexOf('load');
  const input = uStart + (at >= 0 ? plant.d0[at] : 0);
  if (input === 0 || !Number.isFinite(input)) return { x, warning: null };
  const rhs = new Float64Array(lin.nx);
  for (let i = 0; i < lin.nx; i++) rhs[i] = -lin.b[i] * input;
  const xs = solve(lin.a, lin.nx, rhs);
  if (xs === null || !xs.every(Number.isFinite)) {
    return { x, warning: 'the model integrates, so no steady state holds the initial output: the trial starts from rest' };
  }
  for (let i = 0; i < lin.nx; i++) x[i] += xs[i];
  return { x, warning: null };
}

/**
 * The start of a loop as the engine runs it: the actuator position at t = 0 (the loop's own
 * `start` when its builder gave one, else the trial's initial output, else 0, inside the
 * actuator's limits) and the plant state there. One function for `Simulation` and the batch
 * runner so that both start alike.
 */
export function loopStart(
  plant: PlantDynamics,
  loop: LoopConfig,
  initialOutput: number | null | undefined,
  start: TrialStart | undefined,
): { x: Float64Array; uStart: number; warning: string | null } {
  const given = loop.start;
  const u0 = given !== undefined ? given.u : (initialOutput ?? Math.min(Math.max(0, loop.actuator.min), loop.actuator.max));
  const uStart = new Actuator(loop.actuator, u0).end;
  if (given !== undefined) {
    if (given.x.length !== plant.nx) throw new TypeError('start state length must equal nx');
    return { x: Float64Array.from(given.x), uStart, warning: null };
  }
  // The plant settles at what the valve delivers at that travel (its characteristic).
  const s = startState(plant, valveInput(loop.actuator, uStart), start ?? 'steady');
  return { x: s.x, uStart, warning: s.warning };
}

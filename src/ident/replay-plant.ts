/**
 * Drive a plant file's model with a logged input on the simulation engine (the same
 * `Simulation` every other command runs), so that a fitted or validated parameter means what
 * it means in `run`, `optimize` and the screen.
 *
 * The loop runs in manual with the controller output set to the logged input at each sample
 * (held over the sample, as a controller output is). The logged input is taken as what reached
 * the plant: no actuator limits or rate limit are applied to it. The measured output is the
 * engine's `ym` with the file's sensor delay and filter but without noise or quantisation: the
 * model's prediction of the logged measurement.
 *
 * Start: an ode plant starts at its steady state for the first logged input when one exists
 * (a log usually starts at rest; the file's `initial` values are only the Newton start), else
 * from the file's initial states; a linear kind starts settled at that input (start-state.ts).
 */
import { steadyStateAtInput } from '../analysis/index.js';
import type { GainSet } from '../model/types.js';
import { chooseStep, createSimulation } from '../sim/index.js';
import type { DiscreteController, LoopConfig, PlantDynamics } from '../sim/index.js';
import type { PlantSpec } from '../model/types.js';

/** A replay set up once for a plant file and a log grid; `run` may be called many times. */
export interface PlantReplay {
  /** Engine loop configuration used (sample time = the log's interval). */
  loop: LoopConfig;
  /** How the run starts, in words. */
  startNote: string;
  /**
   * Simulate with parameter vector `params` (the plant's order; null = the file's values) and
   * the input `u` (absolute, or deviations for a linear kind), writing the measured output into
   * `out[0..n)`. Returns the number of samples simulated before a divergence (n when none).
   */
  run(params: Float64Array | null, u: Float64Array, out: Float64Array): number;
}

/** The controller is never asked in manual; it only has to exist. */
class HeldOutput implements DiscreteController {
  initialize(): void {}
  update(): number {
    return 0;
  }
  track(): void {}
  setGains(_g: GainSet): void {}
}

/** Prepare replays of `dynamics` (compiled from `spec`) on a log sampled every `dt` s. */
export function plantReplay(spec: PlantSpec, dynamics: PlantDynamics, dt: number, u0: number): PlantReplay {
  const integrator = spec.loop.integrator;
  const choice = chooseStep(dynamics, dt, integrator, u0);
  const loop: LoopConfig = {
    actuator: { min: -Infinity, max: Infinity, rateLimit: Infinity },
    sensor: { ...spec.sensor, noiseStd: 0, resolution: 0 },
    sampleTime: dt,
    step: choice.step,
    integrator,
  };
  const controller = new HeldOutput();
  const isOde = dynamics.linear === null;
  let startNote = isOde
    ? 'the model starts at its steady state for the first logged input'
    : 'the linear model starts settled at the first logged input';
  const run = (params: Float64Array | null, u: Float64Array, out: Float64Array): number => {
    const n = u.length;
    const p = params ?? dynamics.params;
    let x0 = dynamics.x0;
    const plant: PlantDynamics = { ...dynamics, params: p };
    if (isOde) {
      const ss = steadyStateAtInput(plant, u[0], { uMin: -Infinity, uMax: Infinity, x0: dynamics.x0 });
      if (ss !== null && ss.x.every(Number.isFinite)) x0 = ss.x;
      else startNote = "no steady state holds the first logged input: the model starts from the file's initial states";
    }
    const sim = createSimulation({ ...plant, x0 }, controller, loop, { initialOutput: u[0], traceCapacity: 1 });
    sim.setMode('manual', u[0]);
    const ym = sim.trace.storage.ym;
    const ts = loop.sampleTime;
    for (let k = 0; k < n; k++) {
      sim.setManualOutput(u[k]);
      if (sim.advance((k + 1) * ts) !== 'ok') {
        for (let i = k; i < n; i++) out[i] = NaN;
        return k;
      }
      out[k] = ym[0];
    }
    return n;
  };
  return { loop, get startNote() { return startNote; }, run };
}

/**
 * The start-up of one loop on the engine: the argument checks, the start point, the integration
 * step, the dead times in steps, the output function and the first output. `Simulation` (one
 * loop, live or scripted) and the batch runner (several loops in one generated function) both
 * start here, so a loop starts alike on either path and a check is written once.
 */
import { valveInput } from './actuator.js';
import { loopStep } from './choose-step.js';
import { delayInSteps, usableDelay } from './delay-line.js';
import { generateOutput, type OutputFunction } from './generate-stepper.js';
import { loopStart } from './start-state.js';
import type { TrialStart } from '../model/types.js';
import type { LoopConfig, PlantDynamics } from './types.js';

/** How the engine starts one loop. Times in s. */
export interface EngineStart {
  /** Plant state at t = 0 (a fresh array the caller owns). */
  x: Float64Array;
  /** Actuator travel at t = 0. */
  uStart: number;
  /** What the plant receives at t = 0: the valve's characteristic at that travel. */
  uIn: number;
  /** Integration step, s, and steps per controller sample. */
  step: number;
  substeps: number;
  /** Step notes, then the start note (as the user reads them). */
  warnings: string[];
  /** Input and sensor dead times in integration steps (what the delay lines can be asked for). */
  inputDelaySteps: number;
  sensorDelaySteps: number;
  /** The plant's output function and its value at t = 0 (disturbances at their initial values). */
  outFn: OutputFunction;
  y0: number;
}

/** Options of `engineStart`. */
export interface EngineStartInit {
  initialOutput?: number | null;
  start?: TrialStart;
  /** Simulated time the run will not go past, s (default none: the whole delay is held). */
  horizon?: number;
  helpers?: Readonly<Record<string, (...args: number[]) => number>>;
}

/** Check the loop and work out its start (throws RangeError/TypeError on a loop the engine cannot run). */
export function engineStart(plant: PlantDynamics, loop: LoopConfig, init: EngineStartInit = {}): EngineStart {
  const ts = loop.sampleTime;
  if (!(ts > 0) || !Number.isFinite(ts)) throw new RangeError('sampleTime must be positive and finite');
  if (!(loop.integrator in { rk4: 1, heun: 1, euler: 1 })) throw new RangeError(`unknown integrator ${loop.integrator}`);
  if (plant.x0.length !== plant.nx) throw new TypeError('x0 length must equal nx');
  const start = loopStart(plant, loop, init.initialOutput, init.start);
  const uIn = valveInput(loop.actuator, start.uStart);
  const chosen = loopStep(plant, ts, loop.step, loop.integrator, uIn);
  const warnings = [...chosen.warnings];
  if (start.warning !== null) warnings.push(start.warning);
  if (!(plant.inputDelay >= 0)) throw new RangeError('input delay must be >= 0');
  if (!(loop.sensor.delay >= 0)) throw new RangeError('sensor delay must be >= 0');
  const horizon = init.horizon ?? Infinity;
  const h = chosen.step;
  const outFn = generateOutput(plant, plant.outputSource, init.helpers);
  return {
    x: start.x,
    uStart: start.uStart,
    uIn,
    step: h,
    substeps: chosen.substeps,
    warnings,
    inputDelaySteps: delayInSteps(usableDelay(plant.inputDelay, horizon, ts), h),
    sensorDelaySteps: delayInSteps(usableDelay(loop.sensor.delay, horizon, ts), h),
    outFn,
    y0: outFn(Float64Array.from(start.x), plant.params, Float64Array.from(plant.d0), uIn, 0),
  };
}

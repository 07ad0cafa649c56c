/**
 * The one place a plant file becomes a runnable loop: the compiled plant, the engine's loop
 * configuration (integration step chosen when the file leaves it open), where the loop starts
 * (settled-start.ts), the controller, the trial, and the notes gathered on the way. `looprig
 * run`, check, diagnose, the tuning context and the screen all start from here, so the same file
 * gives the same trace everywhere.
 */
import { buildController } from '../control/index.js';
import { compilePlant } from '../model/index.js';
import type { ControllerSpec, GainSet, PlantSpec, TrialSpec } from '../model/types.js';
import { chooseStep, type DiscreteController, type LoopConfig, type PlantDynamics } from '../sim/index.js';
import { settledStart, type LoopStart } from './settled-start.js';

/** Options of `buildLoop`. */
export interface BuildLoopOptions {
  /** The compiled plant when the caller has it (e.g. a sweep case with other parameter values). */
  dynamics?: PlantDynamics;
  /**
   * The controller to run instead of the file's: a structure with its model-derived values
   * filled in (tune's resolveController), a comparison candidate. Default `spec.loop.controller`.
   */
  controller?: ControllerSpec;
  /** Run these gains (ideal form) in the controller instead of its own. */
  gains?: GainSet;
}

/** A plant file ready to run. */
export interface BuiltLoop {
  readonly spec: PlantSpec;
  readonly dynamics: PlantDynamics;
  /** The engine's configuration, with the start point (`config.start`) filled in. */
  readonly config: LoopConfig;
  /** The controller spec the loop runs (override applied). */
  readonly controllerSpec: ControllerSpec;
  /** The file's trial, every event included. */
  readonly trial: TrialSpec;
  readonly start: LoopStart;
  /** Step choice and start notes, for the user. */
  readonly notes: readonly string[];
  /**
   * A fresh controller instance (controllers hold state: one per run). `spec` runs another
   * controller spec on the same loop (default `controllerSpec`). Throws when a structure's
   * model-derived values are not filled in (see control's buildStructure).
   */
  controller(spec?: ControllerSpec): DiscreteController;
}

/**
 * Turn a loaded plant file into a loop. Never simulates; the engine (`runTrial(loop.dynamics,
 * loop.controller(), loop.config, loop.trial)`) does.
 */
export function buildLoop(spec: PlantSpec, options: BuildLoopOptions = {}): BuiltLoop {
  const dynamics = options.dynamics ?? compilePlant(spec);
  const l = spec.loop;
  const notes: string[] = [];
  let controllerSpec = options.controller ?? l.controller;
  if (options.gains !== undefined) controllerSpec = { ...controllerSpec, gains: options.gains };
  const base = { actuator: spec.actuator, sensor: spec.sensor, sampleTime: l.sampleTime, integrator: l.integrator, step: l.step ?? NaN };
  const start = settledStart({ ...spec, loop: { ...l, controller: controllerSpec } }, dynamics, base);
  let step = l.step;
  if (step === null) {
    const choice = chooseStep(dynamics, l.sampleTime, l.integrator, start.u);
    step = choice.step;
    for (const w of choice.warnings) notes.push(w);
  }
  if (start.warning !== null) notes.push(start.warning);
  const config: LoopConfig = { ...base, step, start: { x: start.x, u: start.u } };
  const make = (c: ControllerSpec = controllerSpec): DiscreteController => buildController(c, l.sampleTime, dynamics);
  return { spec, dynamics, config, controllerSpec, trial: l.trial, start, notes, controller: make };
}

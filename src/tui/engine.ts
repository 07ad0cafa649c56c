/**
 * The screen's window on the core: set a loop up from a plant file, run a trial with a gain
 * set, measure it. Every number drawn comes from here; nothing here is physics of its own.
 */
import { checkRequirements, trialMetrics, type RequirementResult, type TrialMetrics } from '../analysis/index.js';
import { applyStructure, buildController } from '../control/index.js';
import { compilePlant, MATH_HELPERS, fromIdeal } from '../model/index.js';
import type { ControllerSpec, GainSet, PlantSpec, TrialSpec } from '../model/types.js';
import { chooseStep, runTrial } from '../sim/index.js';
import type { DiscreteController, LoopConfig, PlantDynamics, TrialResult } from '../sim/types.js';
import { formParams, type GainEdit } from './state.js';

/** A compiled loop, made once per file. */
export interface LoopSetup {
  readonly plant: PlantSpec;
  readonly dynamics: PlantDynamics;
  readonly config: LoopConfig;
}

/** One evaluated trial. */
export interface Evaluation {
  readonly result: TrialResult;
  readonly metrics: TrialMetrics;
  readonly checks: RequirementResult[];
  /** Wall time the simulation and metrics took, ms. */
  readonly elapsedMs: number;
}

/** Compile the plant and fix the integration step. */
export function setupLoop(plant: PlantSpec): LoopSetup {
  const dynamics = compilePlant(plant);
  const loop = plant.loop;
  const step = loop.step ?? chooseStep(dynamics, loop.sampleTime, loop.integrator).step;
  const config: LoopConfig = {
    actuator: plant.actuator,
    sensor: plant.sensor,
    sampleTime: loop.sampleTime,
    step,
    integrator: loop.integrator,
  };
  return { plant, dynamics, config };
}

/** The file's controller as an editable gain set, in the file's form. */
export function editFromSpec(spec: ControllerSpec): GainEdit {
  const gains = applyStructure(spec.structure, spec.gains);
  const converted = fromIdeal(spec.form, { kc: gains.kc, ti: gains.ti, td: gains.td });
  const values: Record<string, number> = {};
  for (const k of formParams(spec.structure, spec.form)) {
    const v = spec.values[k];
    values[k] = typeof v === 'number' && !Number.isNaN(v) ? v : (converted?.[k] ?? NaN);
  }
  return { structure: spec.structure, form: spec.form, values, gains };
}

/** A controller of the file's kind with these gains. */
export function controllerFor(setup: LoopSetup, edit: GainEdit): DiscreteController {
  const spec = setup.plant.loop.controller;
  return buildController({ ...spec, structure: edit.structure, gains: edit.gains }, setup.config.sampleTime);
}

/** The gains the controller law runs for a gain set (structure imposed). */
export function runningGains(edit: GainEdit): GainSet {
  return applyStructure(edit.structure, edit.gains);
}

/** The file's trial with a switch to `next` gains at `at` (rehearsing a retune). */
export function rehearsalTrial(trial: TrialSpec, next: GainEdit, at: number): TrialSpec {
  const events = [...screenTrial(trial).events, { kind: 'gains' as const, at, gains: runningGains(next), label: 'new' }];
  // Stable sort: the switch goes after any event scheduled for the same instant.
  events.sort((a, b) => a.at - b.at);
  return { ...trial, events };
}

/**
 * The file's trial as the screen runs it: without the file's own 'gains' events, so that the
 * gain set being edited runs throughout (a rehearsal adds its own switch, see `rehearsalTrial`).
 */
export function screenTrial(trial: TrialSpec): TrialSpec {
  if (!trial.events.some((e) => e.kind === 'gains')) return trial;
  return { ...trial, events: trial.events.filter((e) => e.kind !== 'gains') };
}

/** Labels and instants of the file's own gain switches (the screen tells the user it skips them). */
export function fileGainSwitches(trial: TrialSpec): { at: number; label: string }[] {
  const out: { at: number; label: string }[] = [];
  for (const e of trial.events) if (e.kind === 'gains') out.push({ at: e.at, label: e.label });
  return out;
}

/** Run a trial with a gain set and measure it against the file's requirements. */
export function evaluate(setup: LoopSetup, edit: GainEdit, trial: TrialSpec = screenTrial(setup.plant.loop.trial)): Evaluation {
  const t0 = performance.now();
  const result = runTrial(setup.dynamics, controllerFor(setup, edit), setup.config, trial, { helpers: MATH_HELPERS });
  const req = setup.plant.loop.requirements;
  const metrics = trialMetrics(result.trace, trial, req);
  const checks = checkRequirements(metrics, req);
  return { result, metrics, checks, elapsedMs: performance.now() - t0 };
}

/**
 * A switch instant in steady state: halfway through the longest quiet stretch of the trial (the
 * longest gap between events, or between the last event and the end).
 */
export function defaultSwitchTime(trial: TrialSpec): number {
  const times = [...new Set([0, ...trial.events.map((e) => e.at), trial.duration])].filter((t) => t >= 0 && t <= trial.duration);
  times.sort((a, b) => a - b);
  if (times.length < 2) return trial.duration / 2;
  let best = { from: times[0], to: times[1] };
  for (let i = 2; i < times.length; i++) {
    // Ties go to the later stretch: the loop has had longer to settle there.
    if (times[i] - times[i - 1] >= best.to - best.from) best = { from: times[i - 1], to: times[i] };
  }
  return best.from + (best.to - best.from) / 2;
}

/**
 * Everything about a plant file that does not change from one gain set to the next, prepared once:
 * the compiled plant, the loop configuration, the linear model at the operating point and its
 * frequency response (for margins and Ms).
 */
import { plantFrequencyResponse, type PlantFrequencyResponse } from '../analysis/index.js';
import { compilePlant } from '../model/index.js';
import type { PlantSpec, TrialSpec } from '../model/types.js';
import { chooseStep, type LinearModel, type LoopConfig, type PlantDynamics } from '../sim/index.js';
import { operatingPointModel } from './operating-point.js';

/** A plant file ready for evaluating many gain sets. */
export interface TuningContext {
  spec: PlantSpec;
  dynamics: PlantDynamics;
  loop: LoopConfig;
  /** Linear model at the trial's operating point (exact for linear kinds); null when none could be made. */
  linear: LinearModel | null;
  /** Frequency response of `linear` up to the Nyquist frequency; null with `linear`. */
  response: PlantFrequencyResponse | null;
  /** The file's trial without its scripted gain changes (a gain set is judged on its own). */
  trial: TrialSpec;
  /** Notes from the preparation (step choice, linearisation). */
  notes: string[];
}

/** The engine's loop configuration of a plant file (integration step chosen when the file leaves it open). */
export function loopConfigOf(spec: PlantSpec, dynamics: PlantDynamics): { loop: LoopConfig; notes: string[] } {
  const l = spec.loop;
  const notes: string[] = [];
  let step = l.step;
  if (step === null) {
    const choice = chooseStep(dynamics, l.sampleTime, l.integrator, l.trial.initialOutput ?? 0);
    step = choice.step;
    for (const w of choice.warnings) notes.push(w);
  }
  return {
    loop: { actuator: spec.actuator, sensor: spec.sensor, sampleTime: l.sampleTime, step, integrator: l.integrator },
    notes,
  };
}

/** Frequency response for margin checks at this loop's sample time. */
export function responseOf(linear: LinearModel, spec: PlantSpec): PlantFrequencyResponse {
  const h = spec.loop.sampleTime;
  return plantFrequencyResponse(linear, {
    wMax: Math.PI / h,
    extraDelay: spec.sensor.delay + h / 2,
  });
}

/**
 * Prepare a plant file for tuning. `dynamics` may be passed when the caller compiled it already
 * (e.g. a sweep case with other parameter values).
 */
export function tuningContext(spec: PlantSpec, dynamics: PlantDynamics = compilePlant(spec)): TuningContext {
  const { loop, notes } = loopConfigOf(spec, dynamics);
  const op = operatingPointModel(spec, dynamics);
  for (const n of op.notes) notes.push(n);
  const linear = op.model;
  const t = spec.loop.trial;
  const events = t.events.filter((e) => e.kind !== 'gains');
  if (events.length < t.events.length) notes.push("the trial's scripted gain changes are left out when judging a gain set");
  const trial = { ...t, events };
  return { spec, dynamics, loop, linear, response: linear ? responseOf(linear, spec) : null, trial, notes };
}


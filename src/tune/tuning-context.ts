/**
 * Everything about a plant file that does not change from one gain set to the next, prepared once:
 * the compiled plant, the loop configuration and start (loop/'s buildLoop), the linear model at the operating point and its
 * frequency response (for margins and Ms).
 */
import { plantFrequencyResponse, type PlantFrequencyResponse } from '../analysis/index.js';
import { compilePlant } from '../model/index.js';
import type { PlantSpec, TrialSpec } from '../model/types.js';
import { buildLoop, type LoopStart } from '../loop/index.js';
import type { LinearModel, LoopConfig, PlantDynamics } from '../sim/index.js';
import { operatingPointModel } from './operating-point.js';

/** A plant file ready for evaluating many gain sets. */
export interface TuningContext {
  spec: PlantSpec;
  dynamics: PlantDynamics;
  /** The engine's configuration (loop/'s buildLoop: step chosen, start point filled in). */
  loop: LoopConfig;
  /** Where the file's trial starts (loop/'s settled start): the operating point of the linear model. */
  start: LoopStart;
  /** Linear model at the trial's operating point (exact for linear kinds); null when none could be made. */
  linear: LinearModel | null;
  /** Frequency response of `linear` up to the Nyquist frequency; null with `linear`. */
  response: PlantFrequencyResponse | null;
  /** The file's trial without its scripted gain changes (a gain set is judged on its own). */
  trial: TrialSpec;
  /** Notes from the preparation (step choice, linearisation). */
  notes: string[];
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
  const built = buildLoop(spec, { dynamics });
  const loop = built.config;
  const notes = [...built.notes];
  const op = operatingPointModel(spec, dynamics, built.start);
  for (const n of op.notes) notes.push(n);
  const linear = op.model;
  const t = spec.loop.trial;
  const events = t.events.filter((e) => e.kind !== 'gains');
  if (events.length < t.events.length) notes.push("the trial's scripted gain changes are left out when judging a gain set");
  const trial = { ...t, events };
  return { spec, dynamics, loop, start: built.start, linear, response: linear ? responseOf(linear, spec) : null, trial, notes };
}


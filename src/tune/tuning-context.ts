/**
 * Everything about a plant file that does not change from one gain set to the next, prepared once:
 * the compiled plant, the loop configuration and start (loop/'s buildLoop), the operating points of
 * its trial with their linear models and frequency responses (loop/'s operatingPoints: margins and
 * Ms are judged at every one), and the one linear model the tuning rules start from.
 */
import type { PlantFrequencyResponse } from '../analysis/index.js';
import { compilePlant } from '../model/index.js';
import type { PlantSpec, TrialSpec } from '../model/types.js';
import { buildLoop, operatingPoints, pointResponse, preparePoints, type LoopStart, type PreparedPoint } from '../loop/index.js';
import type { LinearModel, LoopConfig, PlantDynamics } from '../sim/index.js';
import { operatingPointModel } from './operating-point.js';
import { screenTrial } from './judged-trial.js';

/** A plant file ready for evaluating many gain sets. */
export interface TuningContext {
  spec: PlantSpec;
  dynamics: PlantDynamics;
  /** The engine's configuration (loop/'s buildLoop: step chosen, start point filled in). */
  loop: LoopConfig;
  /** Where the file's trial starts (loop/'s settled start): the operating point of the linear model. */
  start: LoopStart;
  /**
   * The trial's operating points (every setpoint level it holds, with the loads then in force),
   * each with its linear model and frequency response: margins and Ms are those of the worst point.
   */
  points: PreparedPoint[];
  /**
   * The linear model the rules start from: the first operating point that has one (the first
   * level the trial holds, as diagnose reports it), else the loop's start; exact for linear kinds;
   * null when none could be made.
   */
  linear: LinearModel | null;
  /** Frequency response of `linear` up to the Nyquist frequency; null with `linear`. */
  response: PlantFrequencyResponse | null;
  /** The file's trial without its scripted gain changes (a gain set is judged on its own). */
  trial: TrialSpec;
  /** Notes from the preparation (step choice, linearisation). */
  notes: string[];
}

/** Frequency response for margin checks at this loop's sample time (loop/'s pointResponse). */
export const responseOf: (linear: LinearModel, spec: PlantSpec) => PlantFrequencyResponse = pointResponse;

/**
 * Prepare a plant file for tuning. `dynamics` may be passed when the caller compiled it already
 * (e.g. a sweep case with other parameter values).
 */
export function tuningContext(spec: PlantSpec, dynamics: PlantDynamics = compilePlant(spec)): TuningContext {
  const built = buildLoop(spec, { dynamics });
  const loop = built.config;
  const notes = [...built.notes];
  const trial = screenTrial(spec.loop.trial);
  if (trial !== spec.loop.trial) notes.push("the trial's scripted gain changes are left out when judging a gain set");
  const ops = operatingPoints(spec, dynamics, trial);
  for (const n of ops.notes) notes.push(n);
  const points = preparePoints(ops.points, spec);
  const first = points.find((p) => p.response !== null);
  if (first !== undefined) {
    return { spec, dynamics, loop, start: built.start, points, linear: first.point.linear, response: first.response, trial, notes };
  }
  // No operating point has a linear model (no steady state at any level): the start's, noted.
  const why = ops.points.find((p) => p.problem !== null)?.problem;
  if (why) notes.push(`no operating point of the trial has a linear model (${why}): the linear model at the start is used`);
  const op = operatingPointModel(spec, dynamics, built.start);
  for (const n of op.notes) notes.push(n);
  const linear = op.model;
  return { spec, dynamics, loop, start: built.start, points, linear, response: linear ? responseOf(linear, spec) : null, trial, notes };
}

